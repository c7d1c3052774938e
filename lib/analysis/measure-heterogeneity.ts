import { largestEigenvalueSymmetric } from "../math/eigen";
import { matrixFromValues } from "../math/matrix";
import { dot, squaredNorm } from "../math/summation";
import type { Task } from "./design";
import { finishPass } from "./objective";
import { readTotals, type PassTotals } from "./objective-pass";
import type { NoiseCentres, PassResult } from "./pass-pool";

export interface ShardMeasurement {
  rows: number;
  /** Fₘ(W), regularizer included. */
  loss: number;
  /** gₘ = ∇Fₘ(W), regularizer included. */
  gradient: Float64Array;
  /** ‖gₘ‖². */
  gradNorm2: number;
  /** σₘ² = (1/nₘ) Σ ‖∇ℓᵢ − mean∇ℓ‖² (NaN when not requested). */
  sigma2: number;
}

export interface PointMeasurement {
  /** F(W) = Σ wₘ Fₘ(W). */
  loss: number;
  gradient: Float64Array;
  gradientNorm: number;
  shards: ShardMeasurement[];
  /** Σ wₘ ‖gₘ − ∇F‖². */
  zeta2: number;
  /** (1/M) Σ ‖gₘ − ḡ‖², ḡ = (1/M) Σ gₘ. */
  zeta2Uniform: number;
  /** √(Σ wₘ‖gₘ‖² / ‖∇F‖²); null where ∇F vanishes (to the optimizer's tolerance). */
  dissimilarity: number | null;
  /** Σ wₘ σₘ² (NaN when not requested). */
  sigma2: number;
  /** (1/N) Σᵢ ‖∇ℓᵢ − mean∇ℓ‖² over all rows (NaN when not requested). */
  sigma2Pooled: number;
}

/**
 * Measures methods.md §3 at the point W from one pass's per-shard totals at W (`shardTotals`, with
 * squared norms when `withNoise`): each shard's Fₘ, gₘ and (when `withNoise`) σₘ², then the
 * weighted and uniform ζ², the dissimilarity B(W) and σ², σ²_pooled.
 * The noise is a variance about the mean, which does not move when every gradient is shifted by
 * the same c: σₘ² = (1/nₘ) Σ ‖∇ℓᵢ − c‖² − ‖mean∇ℓ − c‖². With `centres` (the shards' and the
 * pooled mean gradients, see `findNoiseCentres`) the totals hold sums about them, the second term
 * vanishes and nothing cancels (the two-pass method); without, c = 0, the one-pass form that
 * digests allow (methods.md §9), which loses digits when σₘ² ≪ ‖mean∇ℓ‖².
 * Sources: ζ², Woodworth et al. NeurIPS 2020 (from memory); B(W), Li et al. MLSys 2020, Definition 3;
 * σ² and the law of total variance σ²_pooled = σ² + ζ², standard.
 * `vanishingGradient` is the gradient norm treated as zero (the optimizer's tolerance).
 */
export function measureAtPoint(
  design: { x: { rows: number; cols: number }; shardIds: string[] },
  weights: Float64Array,
  lambda: number,
  shardTotals: PassTotals[],
  {
    withNoise,
    vanishingGradient,
    centres = null,
  }: { withNoise: boolean; vanishingGradient: number; centres?: NoiseCentres | null },
): PointMeasurement {
  const totalRows = design.x.rows;
  const width = design.x.cols;
  const shardCount = design.shardIds.length;
  const size = weights.length;
  const gradient = new Float64Array(size);
  const pooledDataGradient = new Float64Array(size);
  const uniformMean = new Float64Array(size);
  let loss = 0;
  let pooledSquaredDeviations = 0;
  let sigma2 = 0;
  const shards: ShardMeasurement[] = [];

  for (let m = 0; m < shardCount; m++) {
    const evaluation = finishPass(shardTotals[m], weights, width, lambda, withNoise);
    const share = evaluation.rows / totalRows;
    const shardSigma2 = withNoise
      ? Math.max(
          0,
          evaluation.meanSquaredSampleNorm -
            squaredDistance(evaluation.dataGradient, centres?.shards[m] ?? null),
        )
      : Number.NaN;
    loss += share * evaluation.value;
    for (let k = 0; k < size; k++) {
      gradient[k] += share * evaluation.gradient[k];
      pooledDataGradient[k] += share * evaluation.dataGradient[k];
      uniformMean[k] += evaluation.gradient[k] / shardCount;
    }
    pooledSquaredDeviations += readPooledDeviations(shardTotals[m], centres !== null);
    sigma2 += share * shardSigma2;
    shards.push({
      rows: evaluation.rows,
      loss: evaluation.value,
      gradient: evaluation.gradient,
      gradNorm2: squaredNorm(evaluation.gradient),
      sigma2: shardSigma2,
    });
  }

  let zeta2 = 0;
  let zeta2Uniform = 0;
  let weightedSquaredNorms = 0;
  for (const shard of shards) {
    const share = shard.rows / totalRows;
    zeta2 += share * squaredDistance(shard.gradient, gradient);
    zeta2Uniform += squaredDistance(shard.gradient, uniformMean) / shardCount;
    weightedSquaredNorms += share * shard.gradNorm2;
  }
  const gradientNorm = Math.sqrt(squaredNorm(gradient));
  return {
    loss,
    gradient,
    gradientNorm,
    shards,
    zeta2,
    zeta2Uniform,
    dissimilarity:
      gradientNorm > vanishingGradient ? Math.sqrt(weightedSquaredNorms) / gradientNorm : null,
    sigma2,
    sigma2Pooled: withNoise
      ? Math.max(
          0,
          pooledSquaredDeviations / totalRows -
            squaredDistance(pooledDataGradient, centres?.pooled ?? null),
        )
      : Number.NaN,
  };
}

/**
 * The mean data gradients of a pass (per shard and over all rows), to centre the noise pass at the
 * same W on: methods.md §3's σₘ² by two passes.
 */
export function findNoiseCentres(pass: PassResult): NoiseCentres {
  const meanOf = (totals: PassTotals) =>
    readTotals(totals).gradient.map((value) => value / totals.rows);
  return { shards: pass.shards.map(meanOf), pooled: meanOf(pass.pooled) };
}

/** A shard's Σ ‖∇ℓᵢ − c_pooled‖², or its Σ ‖∇ℓᵢ‖² when the pass had no centres (c = 0). */
function readPooledDeviations(totals: PassTotals, centred: boolean): number {
  const sums = readTotals(totals);
  return centred ? sums.pooledSquaredDeviations : sums.squaredNorms;
}

/**
 * The smoothness constant H of methods.md §3 from G = X̃ᵀX̃/N (width × width): softmax
 * ½ λ_max(G) + λ, least squares λ_max(G) + λ. Source: Böhning, Ann. Inst. Stat. Math. 1992,
 * diag(p) − ppᵀ ⪯ ½ I (from memory).
 *
 * Example: G = [[2, 0], [0, 1]] with λ = 0.1 gives 1.1 for softmax and 2.1 for least squares.
 */
export function computeSmoothness(
  gram: Float64Array,
  width: number,
  task: Task,
  lambda: number,
): number {
  const curvature = largestEigenvalueSymmetric(matrixFromValues(width, width, gram));
  return (task === "classification" ? curvature / 2 : curvature) + lambda;
}

/**
 * Cosine similarity of every pair of shard gradients (methods.md §3, "gradient agreement"):
 * cos(gₘ, gₖ) = gₘ·gₖ / (‖gₘ‖‖gₖ‖); null where a gradient is zero.
 *
 * Example: gradients (1, 0), (0, 2), (−3, 0) give [[1, 0, −1], [0, 1, 0], [−1, 0, 1]].
 */
export function measureGradientAgreement(gradients: Float64Array[]): (number | null)[][] {
  const norms = gradients.map((g) => Math.sqrt(squaredNorm(g)));
  return gradients.map((a, m) =>
    gradients.map((b, k) =>
      norms[m] > 0 && norms[k] > 0 ? dot(a, 0, b, 0, a.length) / (norms[m] * norms[k]) : null,
    ),
  );
}

/** ‖a − b‖², with b = null standing for zero (then scaled like `squaredNorm`). */
function squaredDistance(a: Float64Array, b: Float64Array | null): number {
  if (b === null) return squaredNorm(a);
  let total = 0;
  for (let k = 0; k < a.length; k++) {
    const difference = a[k] - b[k];
    total += difference * difference;
  }
  return total;
}
