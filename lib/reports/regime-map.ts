import {
  computeBounds,
  decideVerdict,
  LOCAL_STEP_CHOICES,
  ROUND_CHOICES,
  type BoundInputs,
  type Verdict,
} from "@/lib/analysis/browser";

export interface RegimeMap {
  /** Rows: local steps K, ascending (powers of two up to 4096 and the plan's K). */
  localSteps: number[];
  /** Columns: rounds R, ascending (the engine's round choices and the plan's R). */
  rounds: number[];
  /** log₁₀ ρ, ρ = local / minibatch bound, per (K, R); null where both bounds vanish. */
  log10Ratio: (number | null)[][];
  plan: { localSteps: number; rounds: number };
}

const withPlanValue = (choices: number[], planned: number) =>
  [...new Set([...choices, planned])].sort((a, b) => a - b);

/**
 * The K × R regime map of methods.md §5: log₁₀ of ρ = local SGD bound / minibatch SGD bound for
 * every pair, other constants as in the plan. The engine stores the same grid over its fixed axes;
 * this one adds the plan's own K and R to the axes so the plan has a cell of its own, whose value is
 * exactly the report's ρ.
 */
export function computeRegimeMap(inputs: BoundInputs): RegimeMap {
  const localSteps = withPlanValue(LOCAL_STEP_CHOICES, inputs.localSteps);
  const rounds = withPlanValue(ROUND_CHOICES, inputs.rounds);
  const log10Ratio = localSteps.map((k) =>
    rounds.map((r) => {
      const bounds = computeBounds({ ...inputs, localSteps: k, rounds: r });
      return bounds.minibatch > 0 ? Math.log10(bounds.local / bounds.minibatch) : null;
    }),
  );
  return {
    localSteps,
    rounds,
    log10Ratio,
    plan: { localSteps: inputs.localSteps, rounds: inputs.rounds },
  };
}

/** The verdict a cell of the regime map stands for (thresholds ρ ≤ ½ and ρ ≥ 2 of methods.md §5). */
export function classifyRegimeCell(log10Ratio: number | null): Verdict {
  return decideVerdict(log10Ratio === null ? null : 10 ** log10Ratio);
}
