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
 * Allocates a zero-filled rows × cols matrix.
 *
 * Example: `createMatrix(2, 3).data.length` is 6.
 */
export function createMatrix(rows: number, cols: number): Matrix {
  if (!Number.isInteger(rows) || !Number.isInteger(cols) || rows < 0 || cols < 0) {
    throw new RangeError(`matrix shape must be non-negative integers, got ${rows} × ${cols}`);
  }
  return { data: new Float64Array(rows * cols), rows, cols };
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
