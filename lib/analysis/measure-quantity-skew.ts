import { mean, standardDeviation, sum } from "simple-statistics";

export interface QuantitySkew {
  gini: number;
  /** Coefficient of variation: population standard deviation / mean of the shard sizes. */
  cv: number;
  min: number;
  max: number;
}

/**
 * Quantity skew of the shard sizes nₘ (methods.md §4): Gini = Σᵢ (2i − M − 1) n₍ᵢ₎ / (M Σ n) with
 * sizes sorted ascending and i = 1…M, the coefficient of variation, min and max (standard).
 *
 * Example: sizes [1, 1, 1, 1] give gini 0 and cv 0; sizes [0, 0, 0, 4] give gini 0.75 and cv √3.
 */
export function measureQuantitySkew(sizes: number[]): QuantitySkew {
  const sorted = [...sizes].sort((a, b) => a - b);
  const count = sorted.length;
  const total = sum(sorted);
  // simple-statistics has no Gini coefficient; the sizes are integers, so this sum is exact.
  let gini = 0;
  sorted.forEach((size, index) => (gini += (2 * (index + 1) - count - 1) * size));
  return {
    gini: gini / (count * total),
    cv: standardDeviation(sorted) / mean(sorted),
    min: sorted[0],
    max: sorted[count - 1],
  };
}
