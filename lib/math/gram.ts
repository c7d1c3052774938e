import type { Matrix } from "./matrix";

/**
 * Adds Σ_{i ∈ [rowStart, rowEnd)} xᵢ xᵢᵀ to `out` (cols × cols), where xᵢ is row i of `matrix`.
 * Only the upper triangle (j ≤ k) is accumulated; call `symmetrizeFromUpper` once at the end.
 *
 * Method: rank-one updates row by row, four rows at a time so each output entry is loaded once per
 * four rows (fewer memory round trips; common practice for a cache-friendly syrk).
 *
 * Example: rows [1, 2] and [3, 4] add [[10, 14], [·, 20]] (upper triangle of XᵀX).
 */
export function accumulateGramUpper(
  matrix: Matrix,
  rowStart: number,
  rowEnd: number,
  out: Float64Array,
): void {
  const cols = matrix.cols;
  const x = matrix.data;
  let row = rowStart;
  for (; row + 4 <= rowEnd; row += 4) {
    const a = row * cols;
    const b = a + cols;
    const c = b + cols;
    const d = c + cols;
    for (let j = 0; j < cols; j++) {
      const aj = x[a + j];
      const bj = x[b + j];
      const cj = x[c + j];
      const dj = x[d + j];
      const base = j * cols;
      for (let k = j; k < cols; k++) {
        out[base + k] += aj * x[a + k] + bj * x[b + k] + cj * x[c + k] + dj * x[d + k];
      }
    }
  }
  for (; row < rowEnd; row++) {
    const a = row * cols;
    for (let j = 0; j < cols; j++) {
      const aj = x[a + j];
      const base = j * cols;
      for (let k = j; k < cols; k++) out[base + k] += aj * x[a + k];
    }
  }
}

/**
 * Adds Σ_{i ∈ [rowStart, rowEnd)} aᵢ xᵢ xᵢᵀ to `out` (cols × cols, upper triangle j ≤ k only), where
 * xᵢ is row i of `matrix` and aᵢ = rowWeights[i]: the weighted Gram matrix Xᵀ diag(a) X, the building
 * block of a generalized linear model's Hessian.
 *
 * Method: as `accumulateGramUpper`, four rows at a time, with each row's weight folded into its
 * left factor once per entry of the row.
 *
 * Example: rows [1, 2] and [3, 4] with weights 2 and −1 add [[−7, −8], [·, −8]].
 */
export function accumulateWeightedGramUpper(
  matrix: Matrix,
  rowWeights: Float64Array,
  rowStart: number,
  rowEnd: number,
  out: Float64Array,
): void {
  const cols = matrix.cols;
  const x = matrix.data;
  let row = rowStart;
  for (; row + 4 <= rowEnd; row += 4) {
    const a = row * cols;
    const b = a + cols;
    const c = b + cols;
    const d = c + cols;
    const weightA = rowWeights[row];
    const weightB = rowWeights[row + 1];
    const weightC = rowWeights[row + 2];
    const weightD = rowWeights[row + 3];
    for (let j = 0; j < cols; j++) {
      const aj = weightA * x[a + j];
      const bj = weightB * x[b + j];
      const cj = weightC * x[c + j];
      const dj = weightD * x[d + j];
      const base = j * cols;
      for (let k = j; k < cols; k++) {
        out[base + k] += aj * x[a + k] + bj * x[b + k] + cj * x[c + k] + dj * x[d + k];
      }
    }
  }
  for (; row < rowEnd; row++) {
    const a = row * cols;
    const weight = rowWeights[row];
    for (let j = 0; j < cols; j++) {
      const aj = weight * x[a + j];
      const base = j * cols;
      for (let k = j; k < cols; k++) out[base + k] += aj * x[a + k];
    }
  }
}

/**
 * Copies the upper triangle of a square size × size array onto its lower triangle.
 *
 * Example: [[1, 2], [0, 3]] becomes [[1, 2], [2, 3]].
 */
export function symmetrizeFromUpper(values: Float64Array, size: number): void {
  for (let j = 0; j < size; j++) {
    for (let k = j + 1; k < size; k++) values[k * size + j] = values[j * size + k];
  }
}
