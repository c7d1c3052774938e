import type { Design } from "../design";
import { formatShardId, type ShardAssignment } from "./layout-rows";

/**
 * The design of one candidate layout: the encoded rows (held in file order by the planner's one
 * encoding) regrouped shard by shard, file order kept within a shard — exactly the design the
 * analysis builds when it reads the exported partition map, since encoding depends only on pooled
 * statistics. Shards left empty by a generator are not shards of the layout.
 */
export function regroupDesign(
  base: Design,
  assignment: ShardAssignment,
  shardCount: number,
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
  // Shared memory: the pass threads read the candidate's rows without a copy.
  const values = new Float64Array(new SharedArrayBuffer(rows * width * 8));
  const source = base.x.data;
  const labels = base.labels && new Int32Array(new SharedArrayBuffer(rows * 4));
  const targets = base.targets && new Float64Array(new SharedArrayBuffer(rows * 8));
  // For classification the skew categories are the labels themselves (as in encodeDesign).
  const skewCategories = labels ?? new Int32Array(rows);
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
