import type { Design } from "./design";

/**
 * Feature shift per shard (methods.md §4): the RMS over the d features (bias excluded) of the shard's
 * mean in standardized units, √((1/d) Σⱼ x̄ₘⱼ²) — the pooled mean of each standardized feature is 0,
 * so this is the RMS standardized mean difference. 0 when there are no features.
 *
 * Example: a shard whose rows all sit one pooled standard deviation above the mean in every feature
 * has feature shift 1.
 */
export function measureFeatureShift(design: Design): number[] {
  const width = design.x.cols;
  const features = width - 1;
  const x = design.x.data;
  const sums = new Float64Array(features);
  return design.shardIds.map((_, m) => {
    const rowStart = design.shardOffsets[m];
    const rowEnd = design.shardOffsets[m + 1];
    sums.fill(0);
    for (let row = rowStart; row < rowEnd; row++) {
      const base = row * width;
      for (let j = 0; j < features; j++) sums[j] += x[base + j];
    }
    return measureFeatureShiftFromSums(sums, rowEnd - rowStart);
  });
}

/**
 * The feature shift of one shard from Σx̃ over its nₘ rows (the d features, bias excluded):
 * √((1/d) Σⱼ (Σx̃ⱼ/nₘ)²), 0 without features. Lets merged digests (methods.md §9) share the formula.
 *
 * Example: sums [3, −3] over 3 rows give 1.
 */
export function measureFeatureShiftFromSums(sums: ArrayLike<number>, rows: number): number {
  const features = sums.length;
  if (features === 0) return 0;
  let squares = 0;
  for (let j = 0; j < features; j++) squares += (sums[j] / rows) ** 2;
  return Math.sqrt(squares / features);
}
