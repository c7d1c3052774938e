import type { Design } from "../design";
import { formatShardId, type ShardAssignment } from "./layout-rows";

/**
 * Shared memory for one candidate's regrouped rows at a time. The planner regroups every
 * candidate into the same memory: filling pages the process has not touched yet costs more than
 * the copy itself, and the pass threads keep every design they were shown.
 */
export interface RegroupedRows {
  values: Float64Array;
  labels: Int32Array | null;
  targets: Float64Array | null;
  /** The skew categories when they are not the labels (regression). */
  categories: Int32Array | null;
}

export function allocateRegroupedRows(base: Design): RegroupedRows {
  const rows = base.x.rows;
  return {
    values: new Float64Array(new SharedArrayBuffer(rows * base.x.cols * 8)),
    labels: base.labels && new Int32Array(new SharedArrayBuffer(rows * 4)),
    targets: base.targets && new Float64Array(new SharedArrayBuffer(rows * 8)),
    categories: base.labels ? null : new Int32Array(rows),
  };
}

/**
 * The design of one candidate layout: the encoded rows (held in file order by the planner's one
 * encoding) regrouped shard by shard, file order kept within a shard — exactly the design the
 * analysis builds when it reads the exported partition map, since encoding depends only on pooled
 * statistics. Shards left empty by a generator are not shards of the layout. The design lives in
 * `into`, so regrouping into it again replaces it: its analysis must be over by then (a pass
 * thread still finishing one of its tasks only writes a result no one reads any more).
 */
export function regroupDesign(
  base: Design,
  assignment: ShardAssignment,
  shardCount: number,
  into: RegroupedRows,
): Design {
  const rows = base.x.rows;
  const width = base.x.cols;
  const sizes = new Int32Array(shardCount);
  for (const shard of assignment) sizes[shard]++;
  const kept = Array.from(sizes, (size, m) => m).filter((m) => sizes[m] > 0);
  const shardOffsets = new Int32Array(kept.length + 1);
  const next = new Int32Array(shardCount);
  kept.forEach((m, rank) => {
    next[m] = shardOffsets[rank];
    shardOffsets[rank + 1] = shardOffsets[rank] + sizes[m];
  });
  const { values, labels, targets } = into;
  const source = base.x.data;
  // For classification the skew categories are the labels themselves (as in encodeDesign).
  const skewCategories = labels ?? (into.categories as Int32Array);
  for (let row = 0; row < rows; row++) {
    const position = next[assignment[row]]++;
    values.set(source.subarray(row * width, (row + 1) * width), position * width);
    if (targets) targets[position] = (base.targets as Float64Array)[row];
    skewCategories[position] = base.skewCategories[row];
  }
  return {
    ...base,
    x: { rows, cols: width, data: values },
    labels,
    targets,
    skewCategories,
    shardIds: kept.map((m) => formatShardId(m, shardCount)),
    shardOffsets,
  };
}
