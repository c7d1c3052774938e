import {
  hellingerDistance,
  jensenShannonDivergence,
  klDivergence,
  shannonEntropy,
  totalVariation,
} from "../math/divergences";
import { logRisingFactorial } from "../math/special-functions";
import { maximizeOnInterval } from "../math/scalar-search";

export interface ShardLabelSkew {
  tv: number;
  hellinger: number;
  js: number;
  kl: number;
  classesPresent: number;
  effectiveClasses: number;
  /** Rows per category (class or regression decile bin). */
  counts: number[];
}

export interface LabelSkew {
  /** Pooled proportions p. */
  pooled: number[];
  shards: ShardLabelSkew[];
  /** wₘ-weighted means of the four divergences. */
  tv: number;
  hellinger: number;
  js: number;
  kl: number;
  max: { tv: number; hellinger: number; js: number; kl: number };
  dirichletAlpha: number;
}

/**
 * Label skew of methods.md §4 from per-shard category counts (M × K): per shard the total variation,
 * Hellinger distance, Jensen–Shannon divergence and KL(qₘ‖p) against the pooled proportions p,
 * classes present and effective classes exp(H(qₘ)); their wₘ-weighted means and maxima; and the
 * Dirichlet concentration α̂.
 */
export function measureLabelSkew(counts: number[][]): LabelSkew {
  const categories = counts[0].length;
  const shardRows = counts.map((row) => row.reduce((a, b) => a + b, 0));
  const total = shardRows.reduce((a, b) => a + b, 0);
  const pooled = Array.from(
    { length: categories },
    (_, c) => counts.reduce((sum, row) => sum + row[c], 0) / total,
  );
  const shards = counts.map((row, m) => {
    const q = row.map((count) => count / shardRows[m]);
    return {
      tv: totalVariation(q, pooled),
      hellinger: hellingerDistance(q, pooled),
      js: jensenShannonDivergence(q, pooled),
      kl: klDivergence(q, pooled),
      classesPresent: q.filter((value) => value > 0).length,
      effectiveClasses: Math.exp(shannonEntropy(q)),
      counts: row,
    };
  });
  const weighted = (key: "tv" | "hellinger" | "js" | "kl") =>
    shards.reduce((sum, shard, m) => sum + (shardRows[m] / total) * shard[key], 0);
  const largest = (key: "tv" | "hellinger" | "js" | "kl") =>
    shards.reduce((best, shard) => Math.max(best, shard[key]), 0);
  return {
    pooled,
    shards,
    tv: weighted("tv"),
    hellinger: weighted("hellinger"),
    js: weighted("js"),
    kl: weighted("kl"),
    max: {
      tv: largest("tv"),
      hellinger: largest("hellinger"),
      js: largest("js"),
      kl: largest("kl"),
    },
    dirichletAlpha: estimateDirichletAlpha(counts, pooled),
  };
}

/** Search range of α̂ (methods.md §4). */
export const DIRICHLET_ALPHA_RANGE = [1e-3, 1e6] as const;

/**
 * α̂ = argmax over α ∈ [1e-3, 1e6] of Σₘ log DirMult(countsₘ | nₘ, α p), where
 * log DirMult(x | n, a) = log n! − Σ_c log x_c! + log Γ(A) − log Γ(n + A) + Σ_c [log Γ(x_c + a_c) − log Γ(a_c)],
 * A = Σ a_c = α. The multinomial coefficient does not depend on α and is left out. Searched on
 * log α (grid, then golden section) to a relative precision of 1e-6 in α.
 * Sources: partition model qₘ ~ Dir(α p), Hsu et al., arXiv:1909.06335, 2019; likelihood, Minka,
 * "Estimating a Dirichlet distribution", 2000 (both from memory).
 *
 * Example: shards with identical proportions equal to p drive α̂ to the upper end 1e6 (IID-like);
 * shards that each hold a single class drive it toward the lower end.
 */
export function estimateDirichletAlpha(counts: number[][], pooled: number[]): number {
  const present = pooled.map((value, c) => (value > 0 ? c : -1)).filter((c) => c >= 0);
  const shardRows = counts.map((row) => row.reduce((a, b) => a + b, 0));
  const logLikelihood = (logAlpha: number) => {
    const alpha = Math.exp(logAlpha);
    let total = 0;
    counts.forEach((row, m) => {
      total -= logRisingFactorial(alpha, shardRows[m]);
      for (const c of present) total += logRisingFactorial(alpha * pooled[c], row[c]);
    });
    return total;
  };
  const [lower, upper] = DIRICHLET_ALPHA_RANGE;
  const best = maximizeOnInterval(logLikelihood, Math.log(lower), Math.log(upper), {
    gridPoints: 91,
    tolerance: 1e-7,
  });
  // Near the ends the likelihood is flat to rounding (for an IID split it rises like 1/α toward
  // 1e6); an end whose value ties the maximum to 1e-12 relative is reported as that end.
  for (const end of [upper, lower]) {
    const value = logLikelihood(Math.log(end));
    if (value >= best.value - 1e-12 * Math.abs(best.value)) return end;
  }
  return Math.min(upper, Math.max(lower, Math.exp(best.argument)));
}
