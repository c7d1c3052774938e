import type { Matrix } from "../../math/matrix";

/**
 * What a layout generator sees of the kept rows (methods.md §8), in file order: each row's class
 * (the label, or the regression decile bin of §4), its standardized features, and its group.
 */
export interface LayoutRows {
  /** Per row, the class index in code-point order (or the decile bin). */
  classes: Int32Array;
  classCount: number;
  /** N × (d + 1) standardized features with the bias last (the encoded design's matrix). */
  features: Matrix;
  /** Per row, an index into `groupIds`; null without a group column. */
  groups: Int32Array | null;
  /** Group values in first-appearance order. */
  groupIds: string[];
}

/**
 * A layout: the shard index (0-based, < shardCount) of every row. Shard m is named by
 * `formatShardId(m, shardCount)`.
 */
export type ShardAssignment = Int32Array;

/** `s001`, `s002`, … zero-padded to the width of M (methods.md §8), so code-point order is numeric. */
export function formatShardId(shard: number, shardCount: number): string {
  return `s${String(shard + 1).padStart(String(shardCount).length, "0")}`;
}

/** Rows of each class, in row order. */
export function listRowsByClass(rows: LayoutRows): Int32Array[] {
  const counts = new Int32Array(rows.classCount);
  for (const c of rows.classes) counts[c]++;
  const lists = Array.from(counts, (count) => new Int32Array(count));
  const filled = new Int32Array(rows.classCount);
  rows.classes.forEach((c, row) => (lists[c][filled[c]++] = row));
  return lists;
}
