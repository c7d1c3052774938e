import { computeBounds, LOCAL_STEP_CHOICES, type BoundInputs, type Bounds, type PartitionSummary } from "@/lib/analysis/browser";

/**
 * The constants and plan the engine fed to its bounds (lib/analysis/analyze-partition.ts): H, B,
 * σ² at the reference point, ζ² max along the path, and the plan M, K, R, b as the advice records it.
 */
export function readBoundInputs(summary: PartitionSummary): BoundInputs {
  return {
    smoothness: summary.heterogeneity.smoothness,
    distance: summary.model.distance,
    sigma2: summary.heterogeneity.sigma2,
    zeta2Max: summary.heterogeneity.zeta2Max,
    participants: summary.advice.participants,
    localSteps: summary.advice.localSteps,
    rounds: summary.advice.rounds,
    batchSize: summary.advice.batchSize,
  };
}

export type BoundCurvePoint = Bounds & { localSteps: number };

export interface BoundCurves {
  points: BoundCurvePoint[];
  /** Smallest K on the curve where local SGD's bound is below minibatch SGD's, or null. */
  crossoverLocalSteps: number | null;
  /** False when a bound is zero or not finite, so a log-scale chart cannot show it. */
  drawable: boolean;
}

/**
 * The three bounds of methods.md §5 against the local steps K (the plan's own K added to the powers
 * of two up to 4096), everything else as in the plan. The crossover is found the same way as the
 * engine's advice.crossoverLocalSteps, so the two agree.
 */
export function computeBoundCurves(inputs: BoundInputs): BoundCurves {
  const localSteps = [...new Set([...LOCAL_STEP_CHOICES, inputs.localSteps])].sort((a, b) => a - b);
  const points = localSteps.map((k) => ({
    localSteps: k,
    ...computeBounds({ ...inputs, localSteps: k }),
  }));
  const crossover = points.find(
    (point) => LOCAL_STEP_CHOICES.includes(point.localSteps) && point.local < point.minibatch,
  );
  const drawable = points.every((point) =>
    [point.minibatch, point.acceleratedMinibatch, point.local].every(
      (value) => Number.isFinite(value) && value > 0,
    ),
  );
  return { points, crossoverLocalSteps: crossover?.localSteps ?? null, drawable };
}
