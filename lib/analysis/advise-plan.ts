export type Verdict = "local-updates" | "large-minibatch" | "no-clear-winner";

/** The training plan of methods.md §5 and the problem constants the bounds need. */
export interface BoundInputs {
  /** H, the smoothness constant. */
  smoothness: number;
  /** B = ‖W* − W₀‖. */
  distance: number;
  /** σ², per-sample gradient variance (before dividing by the batch size). */
  sigma2: number;
  /** ζ² max along the path to W*. */
  zeta2Max: number;
  participants: number;
  localSteps: number;
  rounds: number;
  batchSize: number;
}

export interface Bounds {
  minibatch: number;
  acceleratedMinibatch: number;
  local: number;
}

/**
 * The three convergence bounds of methods.md §5 (convex rates, constants and log factors dropped),
 * with σ_b² = σ²/b:
 *   minibatch SGD:             H B²/R + σ_b B/√(MKR)
 *   accelerated minibatch SGD: H B²/R² + σ_b B/√(MKR)
 *   local SGD:                 H B²/(KR) + σ_b B/√(MKR) + (H σ_b² B⁴)^{1/3}/(K^{1/3} R^{2/3})
 *                              + (H ζ²_max B⁴)^{1/3}/R^{2/3}
 * Sources: Woodworth et al., "Is Local SGD Better than Minibatch SGD?", ICML 2020, and
 * "Minibatch vs Local SGD for Heterogeneous Distributed Learning", NeurIPS 2020 (both from memory).
 *
 * Example: H = 1, B = 1, σ² = 0, ζ² = 0, M = 1, K = 10, R = 100, b = 1 gives minibatch 0.01,
 * accelerated 1e-4 and local 0.001.
 */
export function computeBounds(inputs: BoundInputs): Bounds {
  const { smoothness: h, distance: b, participants: m, localSteps: k, rounds: r } = inputs;
  const noise = Math.sqrt(inputs.sigma2 / inputs.batchSize);
  const statistical = (noise * b) / Math.sqrt(m * k * r);
  const b2 = b * b;
  const b4 = b2 * b2;
  return {
    minibatch: (h * b2) / r + statistical,
    acceleratedMinibatch: (h * b2) / (r * r) + statistical,
    local:
      (h * b2) / (k * r) +
      statistical +
      Math.cbrt(h * noise * noise * b4) / (Math.cbrt(k) * Math.cbrt(r * r)) +
      Math.cbrt(h * inputs.zeta2Max * b4) / Math.cbrt(r * r),
  };
}

/**
 * ρ ≤ ½ → local updates; ρ ≥ 2 → large minibatches; otherwise no clear winner (the bounds hide
 * constants, so nothing finer than a factor of two is claimed; methods.md §5).
 */
export function decideVerdict(ratio: number | null): Verdict {
  if (ratio === null) return "no-clear-winner";
  if (ratio <= 0.5) return "local-updates";
  if (ratio >= 2) return "large-minibatch";
  return "no-clear-winner";
}

/** Local steps tried for the crossover and the regime map: powers of two up to 4096. */
export const LOCAL_STEP_CHOICES = Array.from({ length: 13 }, (_, i) => 2 ** i);
/** Rounds on the regime map's other axis. */
export const ROUND_CHOICES = [1, 2, 5, 10, 20, 50, 100, 200, 500, 1000, 2000, 5000, 10000];

export const ADVICE_CAVEATS = [
  "The verdict rests on a convex proxy model (the reference model), not on your network.",
  "The bounds are rates up to constants and log factors; no factor finer than two is meaningful.",
  "A deep network can behave differently; treat the advice as a guide for planning, not a guarantee.",
];

export interface Advice extends Bounds {
  participants: number;
  localSteps: number;
  rounds: number;
  batchSize: number;
  /** ρ = local / minibatch; null when both bounds vanish. */
  ratio: number | null;
  verdict: Verdict;
  /** ζ*² ≥ H²B²/R: local SGD cannot beat minibatch SGD order-wise. */
  heterogeneityBarrier: boolean;
  /** Smallest K in LOCAL_STEP_CHOICES where local SGD's bound beats minibatch SGD's, or null. */
  crossoverLocalSteps: number | null;
  /** The regime map: log₁₀ ρ for every (K, R); rows follow `localSteps`, columns `rounds`. */
  regimeMap: { localSteps: number[]; rounds: number[]; log10Ratio: (number | null)[][] };
  caveats: string[];
}

/**
 * Advice of methods.md §5 for the plan in `inputs`: the bounds, ρ, the verdict, the heterogeneity
 * barrier ζ*² ≥ H²B²/R (Woodworth et al. NeurIPS 2020, from memory), the crossover K and the K × R
 * regime map. `zeta2Star` is ζ² at W*.
 */
export function advisePlan(inputs: BoundInputs, zeta2Star: number): Advice {
  const bounds = computeBounds(inputs);
  const ratioOf = (local: number, minibatch: number) => (minibatch > 0 ? local / minibatch : null);
  const ratio = ratioOf(bounds.local, bounds.minibatch);
  const crossover = LOCAL_STEP_CHOICES.find((localSteps) => {
    const candidate = computeBounds({ ...inputs, localSteps });
    return candidate.local < candidate.minibatch;
  });
  const { smoothness: h, distance: b, rounds: r } = inputs;
  return {
    participants: inputs.participants,
    localSteps: inputs.localSteps,
    rounds: inputs.rounds,
    batchSize: inputs.batchSize,
    ...bounds,
    ratio,
    verdict: decideVerdict(ratio),
    heterogeneityBarrier: b > 0 && zeta2Star >= (h * h * b * b) / r,
    crossoverLocalSteps: crossover ?? null,
    regimeMap: {
      localSteps: LOCAL_STEP_CHOICES,
      rounds: ROUND_CHOICES,
      log10Ratio: LOCAL_STEP_CHOICES.map((localSteps) =>
        ROUND_CHOICES.map((rounds) => {
          const cell = computeBounds({ ...inputs, localSteps, rounds });
          const cellRatio = ratioOf(cell.local, cell.minibatch);
          return cellRatio === null ? null : Math.log10(cellRatio);
        }),
      ),
    },
    caveats: ADVICE_CAVEATS,
  };
}
