import type { ScratchFile } from "./scratch-file";

/**
 * A rows × cols matrix kept row-major in a scratch file instead of memory (when it would not fit in
 * the analysis's memory limit), read back `blockRows` rows at a time.
 */
export interface StoredMatrix {
  readonly rows: number;
  readonly cols: number;
  readonly file: ScratchFile;
  /** Rows per block read: a multiple of 16 384 (see memory-limit.ts `chooseBlockRows`). */
  readonly blockRows: number;
}

/** True for a matrix in a scratch file, false for one in memory. */
export function isStoredMatrix(matrix: object): matrix is StoredMatrix {
  return "file" in matrix;
}

/** Reads rows [rowStart, rowEnd) into the start of `into`; returns the view holding them. */
export function readStoredRows(
  matrix: StoredMatrix,
  rowStart: number,
  rowEnd: number,
  into: Float64Array,
): Float64Array {
  const values = into.subarray(0, (rowEnd - rowStart) * matrix.cols);
  matrix.file.read(values, rowStart * matrix.cols * Float64Array.BYTES_PER_ELEMENT);
  return values;
}

/**
 * Calls `visit` with every block of `blockRows` rows in order (the last may be shorter), each read
 * into the same buffer, so `visit` must not keep it.
 */
export function forEachStoredBlock(
  matrix: StoredMatrix,
  visit: (values: Float64Array, firstRow: number, rowCount: number) => void,
): void {
  const buffer = new Float64Array(Math.min(matrix.rows, matrix.blockRows) * matrix.cols);
  for (let first = 0; first < matrix.rows; first += matrix.blockRows) {
    const end = Math.min(matrix.rows, first + matrix.blockRows);
    visit(readStoredRows(matrix, first, end, buffer), first, end - first);
  }
}
