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
 */
export class RowStore {
  readonly width: number;
  /** The values, row-major; replaced when the store moves to a larger buffer. */
  values: Float64Array;
  rows = 0;
  private buffer: SharedArrayBuffer;
  private readonly maxGrowableBytes: number;

  constructor(width: number, { maxGrowableBytes = MAX_GROWABLE_BYTES } = {}) {
    this.width = width;
    this.maxGrowableBytes = maxGrowableBytes;
    this.buffer = new SharedArrayBuffer(0, { maxByteLength: maxGrowableBytes });
    this.values = new Float64Array(this.buffer);
  }

  /** Makes room for one more row and returns the offset of its first value in `values`. */
  appendRow(): number {
    const offset = this.rows * this.width;
    if (offset + this.width > this.values.length) this.growFor(this.rows + 1);
    this.rows++;
    return offset;
  }

  /** The stored rows as one fixed-length array over the same memory (no copy). */
  finish(): Float64Array {
    return new Float64Array(this.buffer, 0, this.rows * this.width);
  }

  private growFor(rows: number): void {
    const wantedRows = Math.max(rows, this.rows + GROWTH_ROWS, Math.ceil(this.rows * 1.125));
    const bytes = wantedRows * this.width * Float64Array.BYTES_PER_ELEMENT;
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
}
