import type { SeededRandom } from "../../math/random";
import type { Design } from "../design";
import { addRegularizerGradient, computePenalty, countWeightRows } from "../objective";
import {
  accumulatePass,
  createTotals,
  createWorkspace,
  type PassData,
  type PassTotals,
  type PassWorkspace,
} from "../objective-pass";

/**
 * What a run reads of the engine's design: the rows with their classes or targets, and the shards.
 * Small enough to hand to a worker thread (its arrays in shared memory, see run-threads.ts).
 */
export type SimulationDesign = Pick<
  Design,
  "x" | "labels" | "targets" | "classes" | "shardOffsets"
>;

/**
 * Buffers for minibatch gradients on one design, made once per run so the simulation's inner loops
 * allocate nothing. Drawn rows are copied into `batch` and summed by the engine's own pass kernel
 * (`accumulatePass`), so the per-row softmax and least-squares math exists once.
 */
export interface BatchWorkspace {
  /** Room for `batchSize` drawn rows (features, and classes or targets). */
  batch: PassData;
  totals: PassTotals;
  pass: PassWorkspace;
}

export function createBatchWorkspace(design: SimulationDesign, batchSize: number): BatchWorkspace {
  const width = design.x.cols;
  const weightRows = countWeightRows(design);
  return {
    batch: {
      x: { data: new Float64Array(batchSize * width), rows: batchSize, cols: width },
      labels: design.labels === null ? null : new Int32Array(batchSize),
      targets: design.targets === null ? null : new Float64Array(batchSize),
    },
    totals: createTotals(weightRows * width),
    pass: createWorkspace(weightRows, width),
  };
}

/** Empties the sums so the next batches start a new gradient. */
export function clearBatchSums(workspace: BatchWorkspace): void {
  const totals = workspace.totals;
  totals.rows = 0;
  totals.lossSum = 0;
  totals.lossCompensation = 0;
  totals.gradientSum.fill(0);
  totals.gradientCompensation.fill(0);
  totals.squaredGradientNormSum = 0;
  totals.squaredGradientNormCompensation = 0;
}

/**
 * Adds one minibatch of shard rows [shardStart, shardEnd) at W into the workspace's sums: `batchSize`
 * rows drawn uniformly with replacement (methods.md §7), or — when the batch is at least the shard —
 * every row of the shard once, which draws nothing (§7's "b = all rows, no noise").
 */
export function addShardBatch(
  design: PassData,
  shardStart: number,
  shardEnd: number,
  batchSize: number,
  weights: Float64Array,
  random: SeededRandom,
  workspace: BatchWorkspace,
): void {
  const shardRows = shardEnd - shardStart;
  if (batchSize >= shardRows) {
    accumulatePass(design, weights, shardStart, shardEnd, workspace.totals, workspace.pass, false);
    return;
  }
  const width = design.x.cols;
  const source = design.x.data;
  const batch = workspace.batch;
  const target = batch.x.data;
  for (let slot = 0; slot < batchSize; slot++) {
    const row = shardStart + random.integer(shardRows);
    const from = row * width;
    const to = slot * width;
    for (let j = 0; j < width; j++) target[to + j] = source[from + j];
    if (batch.labels !== null) batch.labels[slot] = (design.labels as Int32Array)[row];
    else (batch.targets as Float64Array)[slot] = (design.targets as Float64Array)[row];
  }
  accumulatePass(batch, weights, 0, batchSize, workspace.totals, workspace.pass, false);
}

/**
 * Writes ∇F_S(W) of the rows summed since the last `clearBatchSums` into `gradient`: their mean
 * per-row gradient plus the regularizer λ·W off the bias column (methods.md §2).
 */
export function readBatchGradient(
  workspace: BatchWorkspace,
  weights: Float64Array,
  width: number,
  lambda: number,
  gradient: Float64Array,
): void {
  const totals = workspace.totals;
  const inverse = 1 / totals.rows;
  for (let k = 0; k < gradient.length; k++) {
    gradient[k] = (totals.gradientSum[k] + totals.gradientCompensation[k]) * inverse;
  }
  addRegularizerGradient(weights, width, lambda, gradient);
}

/**
 * F_S(W) of the rows summed since the last `clearBatchSums`: their mean loss plus the regularizer
 * (λ/2)‖W without its bias column‖² (methods.md §2).
 */
export function readBatchLoss(
  workspace: BatchWorkspace,
  weights: Float64Array,
  width: number,
  lambda: number,
): number {
  const totals = workspace.totals;
  return (
    (totals.lossSum + totals.lossCompensation) * (1 / totals.rows) +
    computePenalty(weights, width, lambda)
  );
}
