import { availableParallelism } from "node:os";
import { Worker } from "node:worker_threads";
import { symmetrizeFromUpper } from "../math/gram";
import type { Matrix } from "../math/matrix";
import {
  completeUnfinishedTasks,
  CONTROL_ACTIVE,
  countTasks,
  createControl,
  createScratch,
  GRAM_CHUNK_ROWS,
  passSlotSize,
  planChunks,
  readSlot,
  runTasks,
  type Job,
  type PassThreadData,
  type PassThreadMessage,
  type PassThreadReport,
  type SharedDesignData,
} from "./pass-jobs";
import type { KMeansRows } from "./layouts/kmeans-steps";
import { createTotals, mergeTotals, type PassData, type PassTotals } from "./objective-pass";
import {
  assembleSoftmaxHessian,
  computeClassProbabilities,
  countClassPairs,
} from "./softmax-hessian";

/** Most threads a pool uses by default; the passes stop gaining well before this. */
const MAX_DEFAULT_THREADS = 8;

/** Threads the machine offers (capped), the default size of a pool. */
export function countAvailableThreads(): number {
  return Math.max(1, Math.min(MAX_DEFAULT_THREADS, availableParallelism()));
}

/** Totals of one pass: per shard (in shard order) and over all rows. */
export interface PassResult {
  shards: PassTotals[];
  pooled: PassTotals;
}

/** Mean data gradients from an earlier pass at the same W: per shard, and over all rows. */
export interface NoiseCentres {
  shards: Float64Array[];
  pooled: Float64Array;
}

/**
 * Threads that share the passes over the rows (objective and gradient, Gram matrix, Hessian blocks).
 * The calling thread works too, so a pool of n threads starts n − 1 worker threads; a pool of one
 * runs everything on the calling thread. Designs are shared, not copied: their arrays live in
 * SharedArrayBuffers. Tasks are claimed from a shared counter and every task writes its own result
 * slot, which the calling thread combines in a fixed order, so results are the same bit for bit
 * whatever the number of threads. The calling thread never waits: once no task is left to claim it
 * runs any that a worker has claimed but not finished (on a busy machine a worker thread can be
 * paused for a while), so a job takes at worst about as long as on one thread.
 *
 * Worker threads start at once and load in the background (a TypeScript loader and the kernels,
 * about a second), so a pool is best started before the data is read; jobs begin without the
 * workers that are not ready. `close` ends them.
 */
export class PassPool {
  private readonly workers: Worker[];
  private readonly scratch = createScratch();
  private readonly workerTasks = new Int32Array(new SharedArrayBuffer(4));
  private readonly ready: Promise<unknown>;
  private failure: Error | null = null;
  private rejectReady: (error: Error) => void = () => {};
  private closing = false;
  private nextDesignId = 0;

  constructor(threads: number) {
    if (!Number.isInteger(threads) || threads < 1) {
      throw new RangeError(`a pass pool needs a positive whole number of threads, got ${threads}`);
    }
    const loaded: Promise<void>[] = [];
    this.workers = Array.from({ length: threads - 1 }, () => {
      const worker = this.startWorker();
      loaded.push(
        new Promise((resolve) =>
          worker.on("message", (report: PassThreadReport) => {
            if (report.type === "ready") resolve();
          }),
        ),
      );
      return worker;
    });
    const failed = new Promise<never>((_, reject) => (this.rejectReady = reject));
    this.ready = Promise.race([Promise.all(loaded), failed]);
    // Nobody may be waiting when a thread fails; the next job reports it.
    this.ready.catch(() => {});
  }

  /**
   * Resolves once every worker thread has loaded. The analysis never waits for this; tests and
   * diagnostics do.
   */
  async whenReady(): Promise<void> {
    await this.ready;
  }

  /** Tasks run by the worker threads so far, the rest ran on the calling thread (diagnostics). */
  get tasksRunByWorkers(): number {
    return Atomics.load(this.workerTasks, 0);
  }

  /** Shares a design with the threads; passes then run over its rows, chunked within shards. */
  share(design: PassData, shardOffsets: Int32Array): SharedDesign {
    const data: SharedDesignData = {
      id: this.reserveDesignId(),
      x: { rows: design.x.rows, cols: design.x.cols, data: toShared(design.x.data) },
      labels: design.labels && toShared(design.labels),
      targets: design.targets && toShared(design.targets),
      chunkStarts: planChunks(shardOffsets),
    };
    this.shareData(data);
    return new SharedDesign(this, data, shardOffsets);
  }

  /** A new id for designs shared through `shareData`. */
  reserveDesignId(): number {
    return this.nextDesignId++;
  }

  /**
   * Shares rows already in shared memory under their id; sharing again under the same id replaces
   * them (how a design read from a scratch file shows the threads one block after another).
   */
  shareData(data: SharedDesignData): void {
    this.post({ type: "share", design: data });
  }

  /**
   * Runs every task of `job`, on this thread and the workers. Returns the job's control array,
   * whose active count says whether a worker may still be writing one of the job's slots.
   * A worker thread that failed (a defect, not bad input) is reported at the next job.
   */
  run(job: Job, design: SharedDesignData): Int32Array {
    if (this.failure !== null) throw this.failure;
    const control = createControl(countTasks(job, design));
    this.post({ type: "job", job, control });
    runTasks(job, design, control, this.scratch);
    completeUnfinishedTasks(job, design, control, this.scratch);
    return control;
  }

  /**
   * Runs `job` as `run` does, then waits until no worker thread is inside it: for jobs whose
   * memory the caller changes or reuses next (a block of rows read from a scratch file, k-means
   * bounds). A worker still inside runs a task this thread has already run, so the wait is at most
   * one task's time once the system lets that worker go on.
   */
  runUntilSettled(job: Job, design: SharedDesignData): void {
    const control = this.run(job, design);
    let active = Atomics.load(control, CONTROL_ACTIVE);
    while (active !== 0) {
      // Woken by a worker leaving the job; the timeout only guards against a missed wake-up.
      Atomics.wait(control, CONTROL_ACTIVE, active, 1);
      active = Atomics.load(control, CONTROL_ACTIVE);
    }
  }

  /** Shares rows for the clusters layout's k-means steps, each run over them by every thread. */
  shareKMeansRows(rows: Matrix): KMeansRows {
    const data: SharedDesignData = {
      id: this.reserveDesignId(),
      x: { rows: rows.rows, cols: rows.cols, data: toShared(rows.data) },
      labels: null,
      targets: null,
      chunkStarts: planChunks(Int32Array.of(0, rows.rows)),
    };
    this.shareData(data);
    return {
      run: (step) => this.runUntilSettled({ kind: "k-means", designId: data.id, step }, data),
    };
  }

  /** Ends the worker threads. */
  async close(): Promise<void> {
    this.closing = true;
    await Promise.all(this.workers.map((worker) => worker.terminate()));
  }

  private post(message: PassThreadMessage): void {
    for (const worker of this.workers) worker.postMessage(message);
  }

  private startWorker(): Worker {
    // No inherited flags (a test runner's, say): the entry registers its own TypeScript loader,
    // like lib/reports/analysis-thread-entry.mjs.
    const worker = new Worker(new URL("./pass-thread-entry.mjs", import.meta.url), {
      execArgv: [],
      workerData: { workerTasks: this.workerTasks } satisfies PassThreadData,
    });
    worker.on("message", (report: PassThreadReport) => {
      if (report.type === "failed") this.reportFailure(new Error(`pass thread: ${report.detail}`));
    });
    worker.on("error", (error) => this.reportFailure(error));
    worker.on("exit", (code) => {
      if (!this.closing) this.reportFailure(new Error(`pass thread exited (code ${code})`));
    });
    return worker;
  }

  private reportFailure(error: Error): void {
    this.failure ??= error;
    this.rejectReady(error);
  }
}

/** A design shared with a pool's threads, with the passes the analysis needs over its rows. */
export class SharedDesign implements DesignPasses {
  /** The last pass's result slots, reused once no worker can still write them. */
  private lastPass: { results: Float64Array; control: Int32Array } | null = null;

  constructor(
    readonly pool: PassPool,
    private readonly data: SharedDesignData,
    private readonly shardOffsets: Int32Array,
  ) {}

  get x(): Matrix {
    return this.data.x;
  }

  /**
   * Σ ℓᵢ(W), Σ ∇ℓᵢ(W) and (when asked) Σ ‖∇ℓᵢ(W) − c‖² per shard and over all rows (see
   * objective-pass.ts), in one pass shared by the pool's threads. The centre c is zero, or with
   * `centres` each shard's own (and the pooled one for the pooled deviations).
   */
  evaluate(
    weights: Float64Array,
    withSquaredNorms: boolean,
    centres: NoiseCentres | null = null,
  ): PassResult {
    const size = weights.length;
    const chunkStarts = this.data.chunkStarts;
    const taskCount = chunkStarts.length - 1;
    const last = this.lastPass;
    const results =
      last !== null &&
      last.results.length === taskCount * passSlotSize(size) &&
      Atomics.load(last.control, CONTROL_ACTIVE) === 0
        ? last.results
        : sharedFloat64(taskCount * passSlotSize(size));
    const control = this.pool.run(
      {
        kind: "pass",
        designId: this.data.id,
        weights,
        withSquaredNorms,
        centres: centres && layOutCentres(centres, chunkStarts, this.shardOffsets, size),
        results,
      },
      this.data,
    );
    this.lastPass = { results, control };
    return combinePassSlots(results, chunkStarts, this.shardOffsets, size);
  }

  /**
   * G = X̃ᵀX̃/N, width × width: partial sums over blocks of 16 384 rows, added in block order.
   *
   * Example: rows [1, 2] and [3, 4] give [[5, 7], [7, 10]].
   */
  computeGram(): Float64Array {
    const width = this.data.x.cols;
    const results = sharedFloat64(countGramTasks(this.data.x.rows) * width * width);
    this.pool.run({ kind: "gram", designId: this.data.id, results }, this.data);
    return combineGramSlots(results, this.data.x.rows, width);
  }

  /**
   * ∇²F(W) of the softmax objective over these rows (methods.md §2), C·width square, parameters
   * ordered as in W; its class-pair blocks are shared among the threads.
   *
   * Example: at W = 0 with C classes every pᵢ is uniform, so block (a, b) is
   * (δ_ab/C − 1/C²) X̃ᵀX̃/n, plus λ on the diagonal off the biases.
   */
  computeSoftmaxHessian(weights: Float64Array, lambda: number): Float64Array {
    const width = this.data.x.cols;
    const classCount = weights.length / width;
    const probabilities = toShared(computeClassProbabilities(this.data.x, weights));
    const job: Job = {
      kind: "hessian",
      designId: this.data.id,
      probabilities,
      classCount,
      results: sharedFloat64(countClassPairs(classCount) * width * width),
    };
    this.pool.run(job, this.data);
    const blocks = Array.from({ length: countTasks(job, this.data) }, (_, pair) =>
      job.results.subarray(pair * width * width, (pair + 1) * width * width),
    );
    return assembleSoftmaxHessian(blocks, classCount, width, lambda);
  }
}

/** The centres as a pass job reads them: each chunk's shard's centre, then the pooled one. */
export function layOutCentres(
  centres: NoiseCentres,
  chunkStarts: Int32Array,
  shardOffsets: Int32Array,
  size: number,
): Float64Array {
  const taskCount = chunkStarts.length - 1;
  const laidOut = sharedFloat64((taskCount + 1) * size);
  let shard = 0;
  for (let chunk = 0; chunk < taskCount; chunk++) {
    while (chunkStarts[chunk] >= shardOffsets[shard + 1]) shard++;
    laidOut.set(centres.shards[shard], chunk * size);
  }
  laidOut.set(centres.pooled, taskCount * size);
  return laidOut;
}

/**
 * What the analysis runs over a design's rows, wherever they are (in memory: SharedDesign; in a
 * scratch file: StoredDesign), with the same results bit for bit.
 */
export interface DesignPasses {
  readonly pool: PassPool;
  readonly x: { readonly rows: number; readonly cols: number };
  evaluate(
    weights: Float64Array,
    withSquaredNorms: boolean,
    centres?: NoiseCentres | null,
  ): PassResult;
  computeGram(): Float64Array;
}

/**
 * A pass's totals per shard and pooled, from the chunks' result slots: each shard's chunks merged
 * in order, then the shards in order.
 */
export function combinePassSlots(
  results: Float64Array,
  chunkStarts: Int32Array,
  shardOffsets: Int32Array,
  parameterCount: number,
): PassResult {
  const taskCount = chunkStarts.length - 1;
  const shards: PassTotals[] = [];
  let chunk = 0;
  for (let m = 0; m + 1 < shardOffsets.length; m++) {
    const totals = createTotals(parameterCount);
    for (; chunk < taskCount && chunkStarts[chunk] < shardOffsets[m + 1]; chunk++) {
      mergeTotals(totals, readSlot(results, chunk, parameterCount));
    }
    shards.push(totals);
  }
  const pooled = createTotals(parameterCount);
  for (const totals of shards) mergeTotals(pooled, totals);
  return { shards, pooled };
}

/** Gram tasks over `rows` rows. */
export function countGramTasks(rows: number): number {
  return Math.ceil(rows / GRAM_CHUNK_ROWS);
}

/** G = X̃ᵀX̃/N from the Gram tasks' upper-triangle slots, added in task order. */
export function combineGramSlots(results: Float64Array, rows: number, width: number): Float64Array {
  const gram = new Float64Array(width * width);
  for (let task = 0; task < countGramTasks(rows); task++) {
    for (let k = 0; k < gram.length; k++) gram[k] += results[task * width * width + k];
  }
  symmetrizeFromUpper(gram, width);
  for (let k = 0; k < gram.length; k++) gram[k] /= rows;
  return gram;
}

export function sharedFloat64(length: number): Float64Array {
  return new Float64Array(new SharedArrayBuffer(length * Float64Array.BYTES_PER_ELEMENT));
}

/** The array itself when it already lives in shared memory, else a shared copy. */
export function toShared<T extends Float64Array | Int32Array>(values: T): T {
  if (values.buffer instanceof SharedArrayBuffer) return values;
  const copy = (
    values instanceof Float64Array
      ? sharedFloat64(values.length)
      : new Int32Array(new SharedArrayBuffer(values.length * Int32Array.BYTES_PER_ELEMENT))
  ) as T;
  copy.set(values);
  return copy;
}
