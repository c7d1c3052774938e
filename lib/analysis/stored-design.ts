import type { DesignOnDisk } from "./design";
import {
  GRAM_CHUNK_ROWS,
  passSlotSize,
  planChunks,
  type Job,
  type SharedDesignData,
} from "./pass-jobs";
import {
  combineGramSlots,
  combinePassSlots,
  countGramTasks,
  layOutCentres,
  sharedFloat64,
  toShared,
  type DesignPasses,
  type NoiseCentres,
  type PassPool,
  type PassResult,
} from "./pass-pool";
import { readStoredRows, type StoredMatrix } from "./stored-matrix";

/**
 * The passes of pass-pool.ts over a design kept in a scratch file: each pass reads the rows one
 * block at a time into one shared buffer, shows it to the pool's threads and runs the tasks whose
 * rows it holds. Blocks hold whole tasks — whole chunks of a shard for the objective, whole
 * 16 384-row Gram tasks — and every task writes its slot of results that span the whole design,
 * combined exactly as for a design in memory: the same results bit for bit.
 */
export class StoredDesign implements DesignPasses {
  private readonly matrix: StoredMatrix;
  private readonly labels: Int32Array | null;
  private readonly targets: Float64Array | null;
  private readonly chunkStarts: Int32Array;
  private readonly shardOffsets: Int32Array;
  /** Pass blocks as ranges of chunks: block b holds chunks passBlocks[b] … passBlocks[b + 1]. */
  private readonly passBlocks: number[];
  private readonly buffer: Float64Array;
  private readonly designId: number;
  private passResults: Float64Array | null = null;

  constructor(
    readonly pool: PassPool,
    design: Pick<DesignOnDisk, "x" | "labels" | "targets" | "shardOffsets">,
  ) {
    this.matrix = design.x;
    this.labels = design.labels && toShared(design.labels);
    this.targets = design.targets && toShared(design.targets);
    this.chunkStarts = planChunks(design.shardOffsets);
    this.shardOffsets = design.shardOffsets;
    this.passBlocks = groupChunks(this.chunkStarts, this.matrix.blockRows);
    this.buffer = sharedFloat64(Math.min(this.matrix.rows, this.matrix.blockRows) * this.x.cols);
    this.designId = pool.reserveDesignId();
  }

  get x(): { rows: number; cols: number } {
    return { rows: this.matrix.rows, cols: this.matrix.cols };
  }

  /** Σ ℓᵢ(W), Σ ∇ℓᵢ(W) and (when asked) Σ ‖∇ℓᵢ(W) − c‖², as SharedDesign.evaluate. */
  evaluate(
    weights: Float64Array,
    withSquaredNorms: boolean,
    centres: NoiseCentres | null = null,
  ): PassResult {
    const size = weights.length;
    const slot = passSlotSize(size);
    const taskCount = this.chunkStarts.length - 1;
    if (this.passResults?.length !== taskCount * slot) {
      this.passResults = sharedFloat64(taskCount * slot);
    }
    const results = this.passResults;
    const laidOut = centres && layOutCentres(centres, this.chunkStarts, this.shardOffsets, size);
    for (let block = 0; block + 1 < this.passBlocks.length; block++) {
      const firstChunk = this.passBlocks[block];
      const endChunk = this.passBlocks[block + 1];
      const rowStart = this.chunkStarts[firstChunk];
      const data = this.showRows(
        rowStart,
        this.chunkStarts[endChunk],
        this.chunkStarts.slice(firstChunk, endChunk + 1).map((start) => start - rowStart),
      );
      this.runOnBlock(
        {
          kind: "pass",
          designId: this.designId,
          weights,
          withSquaredNorms,
          centres: laidOut && centresOfBlock(laidOut, firstChunk, endChunk, size),
          results: results.subarray(firstChunk * slot, endChunk * slot),
        },
        data,
      );
    }
    return combinePassSlots(results, this.chunkStarts, this.shardOffsets, size);
  }

  /** G = X̃ᵀX̃/N, as SharedDesign.computeGram. */
  computeGram(): Float64Array {
    const { rows, cols: width } = this.matrix;
    const results = sharedFloat64(countGramTasks(rows) * width * width);
    for (let rowStart = 0; rowStart < rows; rowStart += this.matrix.blockRows) {
      const rowEnd = Math.min(rows, rowStart + this.matrix.blockRows);
      const data = this.showRows(rowStart, rowEnd, Int32Array.of(0, rowEnd - rowStart));
      const firstTask = rowStart / GRAM_CHUNK_ROWS;
      const blockResults = results.subarray(
        firstTask * width * width,
        (firstTask + countGramTasks(rowEnd - rowStart)) * width * width,
      );
      this.runOnBlock({ kind: "gram", designId: this.designId, results: blockResults }, data);
    }
    return combineGramSlots(results, rows, width);
  }

  /** Reads rows [rowStart, rowEnd) into the shared buffer and shows them to the threads. */
  private showRows(rowStart: number, rowEnd: number, chunkStarts: Int32Array): SharedDesignData {
    const data: SharedDesignData = {
      id: this.designId,
      x: {
        rows: rowEnd - rowStart,
        cols: this.matrix.cols,
        data: readStoredRows(this.matrix, rowStart, rowEnd, this.buffer),
      },
      labels: this.labels && this.labels.subarray(rowStart, rowEnd),
      targets: this.targets && this.targets.subarray(rowStart, rowEnd),
      chunkStarts,
    };
    this.pool.shareData(data);
    return data;
  }

  /**
   * Runs a job over the block shown and waits until no thread is inside it, since the next block
   * is read into the same buffer (a thread still running a task would read the wrong rows).
   */
  private runOnBlock(job: Job, data: SharedDesignData): void {
    this.pool.runUntilSettled(job, data);
  }
}

/** A block's chunks' centres, then the pooled centre (the layout a pass job reads). */
function centresOfBlock(
  laidOut: Float64Array,
  firstChunk: number,
  endChunk: number,
  size: number,
): Float64Array {
  const block = sharedFloat64((endChunk - firstChunk + 1) * size);
  block.set(laidOut.subarray(firstChunk * size, endChunk * size));
  block.set(laidOut.subarray(laidOut.length - size), (endChunk - firstChunk) * size);
  return block;
}

/**
 * Consecutive chunks grouped into blocks of at most `blockRows` rows (every chunk is smaller than a
 * block); returns the first chunk of each block and, last, the chunk count.
 */
function groupChunks(chunkStarts: Int32Array, blockRows: number): number[] {
  const chunkCount = chunkStarts.length - 1;
  const blocks = [0];
  for (let chunk = 0; chunk < chunkCount; chunk++) {
    const blockStart = chunkStarts[blocks[blocks.length - 1]];
    if (chunkStarts[chunk + 1] - blockStart > blockRows) blocks.push(chunk);
  }
  blocks.push(chunkCount);
  return blocks;
}
