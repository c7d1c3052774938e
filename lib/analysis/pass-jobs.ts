/**
 * The work that threads share (see pass-pool.ts), written so that any thread can run any task: a
 * job is split into numbered tasks, each task writes only its own slot of a shared result buffer
 * (a k-means step: its own points' entries), and the calling thread combines the slots in task
 * order. The result therefore never depends on how many threads ran or which thread ran which task
 * (or whether two ran the same one).
 */
import { accumulateGramUpper } from "../math/gram";
import type { Matrix } from "../math/matrix";
import { runKMeansStep, type KMeansStep } from "./layouts/kmeans-steps";
import {
  accumulatePass,
  createTotals,
  createWorkspace,
  type PassCentres,
  type PassTotals,
  type PassWorkspace,
} from "./objective-pass";
import { classPairAt, computeHessianBlock, countClassPairs } from "./softmax-hessian";

/** The parts of a design the passes read, every array backed by a SharedArrayBuffer. */
export interface SharedDesignData {
  id: number;
  x: Matrix;
  labels: Int32Array | null;
  targets: Float64Array | null;
  /** Task t of a pass covers rows chunkStarts[t] … chunkStarts[t + 1]; no chunk spans two shards. */
  chunkStarts: Int32Array;
}

/** Most rows per pass task: small enough to balance threads, large enough to amortize merging. */
const PASS_CHUNK_ROWS = 4096;
/** Rows per Gram task. */
export const GRAM_CHUNK_ROWS = 16_384;

/** Chunk borders: every shard cut into pieces of at most PASS_CHUNK_ROWS rows. */
export function planChunks(shardOffsets: Int32Array): Int32Array {
  const starts: number[] = [0];
  for (let m = 0; m + 1 < shardOffsets.length; m++) {
    for (let row = shardOffsets[m]; row < shardOffsets[m + 1];) {
      row = Math.min(shardOffsets[m + 1], row + PASS_CHUNK_ROWS);
      starts.push(row);
    }
  }
  return Int32Array.from(starts);
}

/**
 * Layout of a job's control array (Int32, shared by all threads): the next task to claim, how many
 * worker threads are inside the job, then one done flag per task.
 */
const CONTROL_NEXT_TASK = 0;
export const CONTROL_ACTIVE = 1;
const CONTROL_DONE = 2;

export function createControl(taskCount: number): Int32Array {
  return new Int32Array(
    new SharedArrayBuffer((CONTROL_DONE + taskCount) * Int32Array.BYTES_PER_ELEMENT),
  );
}

export type Job =
  | {
      kind: "pass";
      designId: number;
      weights: Float64Array;
      withSquaredNorms: boolean;
      /**
       * The centres squared norms are taken about (see objective-pass.ts), or null for zero: per
       * task the centre of its chunk's shard, then the pooled centre, P doubles each.
       */
      centres: Float64Array | null;
      /**
       * Per chunk: rows, loss sum and compensation, squared-norm sum and compensation, pooled
       * squared-deviation sum and compensation, gradient sum, its compensation.
       */
      results: Float64Array;
    }
  | { kind: "gram"; designId: number; results: Float64Array }
  | {
      kind: "hessian";
      designId: number;
      /** pᵢ for every row, rows × C. */
      probabilities: Float64Array;
      classCount: number;
      results: Float64Array;
    }
  | {
      /** A step of the clusters layout's k-means over the design's rows, written in place. */
      kind: "k-means";
      designId: number;
      step: KMeansStep;
    };

/** What the calling thread posts to the pool's worker threads. */
export type PassThreadMessage =
  { type: "share"; design: SharedDesignData } | { type: "job"; job: Job; control: Int32Array };

/**
 * What a worker thread posts back: that it has loaded, and failures (completion of a job is
 * signalled in shared memory).
 */
export type PassThreadReport = { type: "ready" } | { type: "failed"; detail: string };

/** workerData of a pass thread: where it counts the tasks it runs (Int32Array of one). */
export interface PassThreadData {
  workerTasks: Int32Array;
}

export function countTasks(job: Job, design: SharedDesignData): number {
  switch (job.kind) {
    case "pass":
    case "k-means":
      return design.chunkStarts.length - 1;
    case "gram":
      return Math.ceil(design.x.rows / GRAM_CHUNK_ROWS);
    case "hessian":
      return countClassPairs(job.classCount);
  }
}

/** Doubles in one pass task's result slot for P parameters. */
export function passSlotSize(parameterCount: number): number {
  return SLOT_GRADIENT + 2 * parameterCount;
}

/** Where the gradient sums start in a pass task's slot (after the scalar sums). */
const SLOT_GRADIENT = 7;

/** Reusable scratch space of one thread. */
export interface TaskScratch {
  pass: PassWorkspace | null;
  totals: PassTotals | null;
  rowWeights: Float64Array | null;
  /** A Gram or Hessian block being summed, width × width. */
  block: Float64Array | null;
}

export function createScratch(): TaskScratch {
  return { pass: null, totals: null, rowWeights: null, block: null };
}

/**
 * Runs tasks of `job` until none are left, claiming each from the shared counter, so fast threads
 * take more, and flags each as done once its slot is written. Returns, when every task has been
 * claimed (others may still be running theirs), the number of tasks this thread ran.
 */
export function runTasks(
  job: Job,
  design: SharedDesignData,
  control: Int32Array,
  scratch: TaskScratch,
): number {
  const taskCount = countTasks(job, design);
  for (let ran = 0; ; ran++) {
    const task = Atomics.add(control, CONTROL_NEXT_TASK, 1);
    if (task >= taskCount) return ran;
    runTask(job, design, task, scratch);
    Atomics.store(control, CONTROL_DONE + task, 1);
  }
}

/**
 * Runs, on the calling thread, every task not yet flagged done — those another thread claimed but
 * has not finished — instead of waiting for it (a thread the system has paused could take long).
 * A task's result depends only on its inputs, so if that thread finishes too it writes the same
 * values into the same slot.
 */
export function completeUnfinishedTasks(
  job: Job,
  design: SharedDesignData,
  control: Int32Array,
  scratch: TaskScratch,
): void {
  const taskCount = countTasks(job, design);
  for (let task = 0; task < taskCount; task++) {
    if (Atomics.load(control, CONTROL_DONE + task) === 1) continue;
    runTask(job, design, task, scratch);
    Atomics.store(control, CONTROL_DONE + task, 1);
  }
}

/**
 * Runs one task. Sums build up in this thread's scratch space and only finished values are copied
 * into the task's slot, so two threads running the same task (see `completeUnfinishedTasks`) write
 * the same values and never add into each other's partial sums.
 */
function runTask(job: Job, design: SharedDesignData, task: number, scratch: TaskScratch): void {
  const width = design.x.cols;
  if (job.kind === "pass") {
    const size = job.weights.length;
    if (scratch.totals?.gradientSum.length !== size) {
      scratch.totals = createTotals(size);
      scratch.pass = createWorkspace(size / width, width);
    }
    const totals = resetTotals(scratch.totals);
    accumulatePass(
      design,
      job.weights,
      design.chunkStarts[task],
      design.chunkStarts[task + 1],
      totals,
      scratch.pass as PassWorkspace,
      job.withSquaredNorms,
      job.centres && centresOfTask(job.centres, task, size),
    );
    writeTotals(totals, job.results, task * passSlotSize(size));
    return;
  }
  if (job.kind === "k-means") {
    runKMeansStep(job.step, design.x, design.chunkStarts[task], design.chunkStarts[task + 1]);
    return;
  }
  if (scratch.block?.length !== width * width) scratch.block = new Float64Array(width * width);
  const block = scratch.block;
  if (job.kind === "gram") {
    block.fill(0);
    const start = task * GRAM_CHUNK_ROWS;
    accumulateGramUpper(design.x, start, Math.min(design.x.rows, start + GRAM_CHUNK_ROWS), block);
  } else {
    if (scratch.rowWeights?.length !== design.x.rows) {
      scratch.rowWeights = new Float64Array(design.x.rows);
    }
    const pair = classPairAt(task, job.classCount);
    computeHessianBlock(design.x, job.probabilities, pair, scratch.rowWeights, block);
  }
  job.results.set(block, task * width * width);
}

/** Task `task`'s centres within a pass job's centre array (views, nothing copied). */
function centresOfTask(centres: Float64Array, task: number, size: number): PassCentres {
  return {
    shard: centres.subarray(task * size, (task + 1) * size),
    pooled: centres.subarray(centres.length - size),
  };
}

function resetTotals(totals: PassTotals): PassTotals {
  totals.rows = 0;
  totals.lossSum = 0;
  totals.lossCompensation = 0;
  totals.squaredGradientNormSum = 0;
  totals.squaredGradientNormCompensation = 0;
  totals.pooledSquaredDeviationSum = 0;
  totals.pooledSquaredDeviationCompensation = 0;
  totals.gradientSum.fill(0);
  totals.gradientCompensation.fill(0);
  return totals;
}

function writeTotals(totals: PassTotals, results: Float64Array, offset: number): void {
  const size = totals.gradientSum.length;
  results[offset] = totals.rows;
  results[offset + 1] = totals.lossSum;
  results[offset + 2] = totals.lossCompensation;
  results[offset + 3] = totals.squaredGradientNormSum;
  results[offset + 4] = totals.squaredGradientNormCompensation;
  results[offset + 5] = totals.pooledSquaredDeviationSum;
  results[offset + 6] = totals.pooledSquaredDeviationCompensation;
  results.set(totals.gradientSum, offset + SLOT_GRADIENT);
  results.set(totals.gradientCompensation, offset + SLOT_GRADIENT + size);
}

/** The totals a pass task wrote into its slot. */
export function readSlot(results: Float64Array, task: number, parameterCount: number): PassTotals {
  const offset = task * passSlotSize(parameterCount);
  return {
    rows: results[offset],
    lossSum: results[offset + 1],
    lossCompensation: results[offset + 2],
    squaredGradientNormSum: results[offset + 3],
    squaredGradientNormCompensation: results[offset + 4],
    pooledSquaredDeviationSum: results[offset + 5],
    pooledSquaredDeviationCompensation: results[offset + 6],
    gradientSum: results.slice(offset + SLOT_GRADIENT, offset + SLOT_GRADIENT + parameterCount),
    gradientCompensation: results.slice(
      offset + SLOT_GRADIENT + parameterCount,
      offset + SLOT_GRADIENT + 2 * parameterCount,
    ),
  };
}
