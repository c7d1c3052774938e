import { roundingError } from "../math/summation";
import type { EncodedDesign } from "./design";
import { forEachStoredBlock, isStoredMatrix } from "./stored-matrix";

/**
 * Feature shift per shard (methods.md §4): the RMS over the d features (bias excluded) of the shard's
 * mean in standardized units, √((1/d) Σⱼ x̄ₘⱼ²) — the pooled mean of each standardized feature is 0,
 * so this is the RMS standardized mean difference. 0 when there are no features. The sums run over
 * the rows in order, whether they are read from memory or block by block from a scratch file.
 *
 * Example: a shard whose rows all sit one pooled standard deviation above the mean in every feature
 * has feature shift 1.
 */
export function measureFeatureShift(
  design: Pick<EncodedDesign, "x" | "shardIds" | "shardOffsets">,
): number[] {
  return sumFeaturesPerShard(design).map((sums, m) =>
    measureFeatureShiftFromSums(sums, design.shardOffsets[m + 1] - design.shardOffsets[m]),
  );
}

/**
 * Σx̃ᵢ over each shard's rows, the d features (the bias's sum is the row count): what feature shift
 * is made of, centrally and in a client's digest (methods.md §9). Neumaier-compensated per feature,
 * because a shard's mean can be small beside its values (the interesting case) and rows are many.
 * The rows are summed in order, whether in memory or read block by block from a scratch file.
 *
 * Example: one feature with rows 1, 1e16, 1, −1e16 sums to 2 (left to right in doubles: 0).
 */
export function sumFeaturesPerShard(
  design: Pick<EncodedDesign, "x" | "shardIds" | "shardOffsets">,
): Float64Array[] {
  const width = design.x.cols;
  const features = width - 1;
  const offsets = design.shardOffsets;
  const compensations = new Float64Array(features);
  const shards: Float64Array[] = [];
  let sums = new Float64Array(features);
  const finishShards = (row: number) => {
    for (; shards.length < design.shardIds.length && offsets[shards.length + 1] <= row;) {
      for (let j = 0; j < features; j++) sums[j] += compensations[j];
      shards.push(sums);
      sums = new Float64Array(features);
      compensations.fill(0);
    }
  };
  const add = (x: Float64Array, firstRow: number, rowCount: number) => {
    for (let k = 0; k < rowCount; k++) {
      finishShards(firstRow + k);
      const base = k * width;
      for (let j = 0; j < features; j++) {
        const value = x[base + j];
        const next = sums[j] + value;
        compensations[j] += roundingError(sums[j], value, next);
        sums[j] = next;
      }
    }
  };
  if (isStoredMatrix(design.x)) forEachStoredBlock(design.x, add);
  else add(design.x.data, 0, design.x.rows);
  finishShards(design.x.rows);
  return shards;
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
