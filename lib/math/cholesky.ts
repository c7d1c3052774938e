import type { Matrix } from "./matrix";

/**
 * Cholesky factorization A = L Lᵀ of a symmetric positive definite n × n matrix, written into
 * `lower` (its strict upper triangle is zeroed). Only A's lower triangle is read.
 *
 * Method: the column-oriented Cholesky–Banachiewicz recurrence
 * L_jj = √(A_jj − Σ_{k<j} L_jk²), L_ij = (A_ij − Σ_{k<j} L_ik L_jk) / L_jj.
 * Source: Golub & Van Loan, "Matrix Computations", 4th ed., Algorithm 4.2.1 (from memory).
 * Throws a RangeError when a pivot is not positive (A is not positive definite).
 *
 * Example: A = [[4, 2], [2, 3]] gives L = [[2, 0], [1, √2]].
 */
export function choleskyDecompose(matrix: Matrix, lower: Matrix): void {
  const size = matrix.rows;
  if (matrix.cols !== size || lower.rows !== size || lower.cols !== size) {
    throw new RangeError(
      `Cholesky needs square matrices of one size, got ${matrix.rows} × ${matrix.cols}`,
    );
  }
  const a = matrix.data;
  const l = lower.data;
  for (let row = 0; row < size; row++) {
    for (let col = 0; col <= row; col++) {
      let value = a[row * size + col];
      for (let k = 0; k < col; k++) value -= l[row * size + k] * l[col * size + k];
      if (row === col) {
        if (!(value > 0)) {
          throw new RangeError(`matrix is not positive definite (pivot ${row} is ${value})`);
        }
        l[row * size + col] = Math.sqrt(value);
      } else {
        l[row * size + col] = value / l[col * size + col];
      }
    }
    for (let col = row + 1; col < size; col++) l[row * size + col] = 0;
  }
}

/**
 * Solves L Lᵀ x = b in place for the vector stored at values[offset..offset+n), given the Cholesky
 * factor L from `choleskyDecompose`: forward substitution with L, then back substitution with Lᵀ.
 * Source: Golub & Van Loan, §4.2 (from memory).
 *
 * Example: with L from A = [[4, 2], [2, 3]] and b = [6, 5], the solution is x = [1, 1].
 */
export function choleskySolveInPlace(lower: Matrix, values: Float64Array, offset = 0): void {
  const size = lower.rows;
  const l = lower.data;
  for (let row = 0; row < size; row++) {
    let value = values[offset + row];
    for (let k = 0; k < row; k++) value -= l[row * size + k] * values[offset + k];
    values[offset + row] = value / l[row * size + row];
  }
  for (let row = size - 1; row >= 0; row--) {
    let value = values[offset + row];
    for (let k = row + 1; k < size; k++) value -= l[k * size + row] * values[offset + k];
    values[offset + row] = value / l[row * size + row];
  }
}
