import { chooseBlockRows, measureRowBudget, type MemorySettings } from "./memory-limit";
import { ScratchFile } from "./scratch-file";
import type { StoredMatrix } from "./stored-matrix";

/**
 * Largest growable SharedArrayBuffer V8 allows (4 GiB); beyond it the store moves to plain ones.
 */
const MAX_GROWABLE_BYTES = 2 ** 32;
/** Rows added per growth step at least. */
const GROWTH_ROWS = 1 << 16;

/**
 * Rows of numbers of a fixed width, appended one at a time while a file of unknown length is read,
 * kept row-major in one SharedArrayBuffer so that, once complete, the same memory can become the
 * design matrix in place (no second copy of the data, no second round of fresh pages for the
 * operating system to supply) and be read by worker threads.
 *
 * The buffer is growable: it reserves address space up to its maximum and takes memory only as
 * rows arrive, so nothing is copied as it grows. Past that maximum (4 GiB) it moves to plain
 * buffers of double the size, a copy each time.
 *
 * With memory settings, rows that would take more than the analysis's share of the memory limit
 * move to a scratch file: what was stored is written there, and from then on `values` is one block
 * that is appended to the file each time it fills.
 */
export class RowStore {
  readonly width: number;
  /** The values, row-major; replaced when the store moves to a larger buffer. */
  values: Float64Array;
  rows = 0;
  private buffer: SharedArrayBuffer;
  private readonly maxGrowableBytes: number;
  private readonly memory: MemorySettings | null;
  /** Once the rows moved to a scratch file: the file and the rows written to it. */
  private stored: { file: ScratchFile; rowsWritten: number; blockRows: number } | null = null;

  constructor(
    width: number,
    {
      maxGrowableBytes = MAX_GROWABLE_BYTES,
      memory = null,
    }: { maxGrowableBytes?: number; memory?: MemorySettings | null } = {},
  ) {
    this.width = width;
    this.maxGrowableBytes = maxGrowableBytes;
    this.memory = memory;
    this.buffer = new SharedArrayBuffer(0, { maxByteLength: maxGrowableBytes });
    this.values = new Float64Array(this.buffer);
  }

  /** Makes room for one more row and returns the offset of its first value in `values`. */
  appendRow(): number {
    if (this.stored !== null) return this.appendStoredRow(this.stored);
    const offset = this.rows * this.width;
    if (offset + this.width > this.values.length) {
      this.growFor(this.rows + 1);
      if (this.stored !== null) return this.appendStoredRow(this.stored);
    }
    this.rows++;
    return offset;
  }

  /**
   * The stored rows: in memory, one fixed-length array over the same memory (no copy); in a scratch
   * file, the file (the caller closes it).
   */
  finish(): Float64Array | StoredMatrix {
    if (this.stored === null) return new Float64Array(this.buffer, 0, this.rows * this.width);
    const { file, blockRows } = this.stored;
    this.flush(this.stored);
    this.values = new Float64Array(0);
    return { rows: this.rows, cols: this.width, file, blockRows };
  }

  /** Gives back a scratch file's space when the rows will not be used (a read that failed). */
  discard(): void {
    this.stored?.file.close();
  }

  private appendStoredRow(stored: { rowsWritten: number; blockRows: number }): number {
    if (this.rows - stored.rowsWritten === stored.blockRows) this.flush(this.stored!);
    const offset = (this.rows - stored.rowsWritten) * this.width;
    this.rows++;
    return offset;
  }

  /** Appends the block's rows to the scratch file. */
  private flush(stored: { file: ScratchFile; rowsWritten: number }): void {
    const pending = this.values.subarray(0, (this.rows - stored.rowsWritten) * this.width);
    stored.file.write(pending, stored.rowsWritten * this.width * Float64Array.BYTES_PER_ELEMENT);
    stored.rowsWritten = this.rows;
  }

  private growFor(rows: number): void {
    const wantedRows = Math.max(rows, this.rows + GROWTH_ROWS, Math.ceil(this.rows * 1.125));
    const bytes = wantedRows * this.width * Float64Array.BYTES_PER_ELEMENT;
    if (this.memory !== null && bytes > measureRowBudget(this.memory)) {
      this.moveToScratchFile(this.memory);
      return;
    }
    if (this.buffer.growable && bytes <= this.maxGrowableBytes) {
      this.buffer.grow(bytes);
      // A length-tracking view would follow the growth, but fixed-length views are what the
      // optimizing compiler handles best in the hot loops.
      this.values = new Float64Array(this.buffer, 0, bytes / Float64Array.BYTES_PER_ELEMENT);
      return;
    }
    const larger = new SharedArrayBuffer(Math.max(bytes, 2 * this.buffer.byteLength));
    const values = new Float64Array(larger);
    values.set(this.values.subarray(0, this.rows * this.width));
    this.buffer = larger;
    this.values = values;
  }

  private moveToScratchFile(memory: MemorySettings): void {
    const file = new ScratchFile(memory.scratchDirectory);
    memory.onScratchFile?.(file.path);
    try {
      file.write(this.values.subarray(0, this.rows * this.width), 0);
    } catch (error) {
      file.close();
      throw error;
    }
    const blockRows = chooseBlockRows(memory, this.width);
    this.stored = { file, rowsWritten: this.rows, blockRows };
    this.buffer = new SharedArrayBuffer(0);
    this.values = new Float64Array(blockRows * this.width);
  }
}
