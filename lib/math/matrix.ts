/**
 * A dense matrix: one row-major `Float64Array` plus its shape. Element (i, j) lives at
 * `data[i * cols + j]`. Kernels in `lib/math` take and write these; shapes are checked once at
 * public entry points, never inside inner loops.
 */
export interface Matrix {
  readonly data: Float64Array;
  readonly rows: number;
  readonly cols: number;
}

/**
 * Allocates a zero-filled rows × cols matrix; with `shared`, in a SharedArrayBuffer, so worker
 * threads can read it without a copy.
 *
 * Example: `createMatrix(2, 3).data.length` is 6.
 */
export function createMatrix(rows: number, cols: number, { shared = false } = {}): Matrix {
  if (!Number.isInteger(rows) || !Number.isInteger(cols) || rows < 0 || cols < 0) {
    throw new RangeError(`matrix shape must be non-negative integers, got ${rows} × ${cols}`);
  }
  const length = rows * cols;
  const data = shared
    ? new Float64Array(new SharedArrayBuffer(length * Float64Array.BYTES_PER_ELEMENT))
    : new Float64Array(length);
  return { data, rows, cols };
}

/**
 * Wraps existing row-major values as a rows × cols matrix (no copy when given a Float64Array).
 *
 * Example: `matrixFromValues(2, 2, [1, 2, 3, 4])` is [[1, 2], [3, 4]].
 */
export function matrixFromValues(rows: number, cols: number, values: ArrayLike<number>): Matrix {
  if (values.length !== rows * cols) {
    throw new RangeError(
      `expected ${rows * cols} values for a ${rows} × ${cols} matrix, got ${values.length}`,
    );
  }
  const data = values instanceof Float64Array ? values : Float64Array.from(values);
  return { data, rows, cols };
}
