import type { Matrix } from "./matrix";

/**
 * Adds Σ_{i ∈ [rowStart, rowEnd)} xᵢ xᵢᵀ to `out` (cols × cols), where xᵢ is row i of `matrix`.
 * Only the upper triangle (j ≤ k) is accumulated; call `symmetrizeFromUpper` once at the end.
 *
 * Method: rank-one updates, four rows at a time so each output entry is loaded once per four rows,
 * and two output rows at a time so each row entry loaded feeds both (fewer memory round trips;
 * common practice for a cache-friendly syrk).
 *
 * Example: rows [1, 2] and [3, 4] add [[10, 14], [·, 20]] (upper triangle of XᵀX).
 */
export function accumulateGramUpper(
  matrix: Matrix,
  rowStart: number,
  rowEnd: number,
  out: Float64Array,
): void {
  accumulateUpper(matrix, null, rowStart, rowEnd, out);
}

/**
 * Adds Σ_{i ∈ [rowStart, rowEnd)} aᵢ xᵢ xᵢᵀ to `out` (cols × cols, upper triangle j ≤ k only), where
 * xᵢ is row i of `matrix` and aᵢ = rowWeights[i]: the weighted Gram matrix Xᵀ diag(a) X, the building
 * block of a generalized linear model's Hessian.
 *
 * Method: as `accumulateGramUpper`, with each row's weight folded into its left factor once per
 * entry of the row.
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
  accumulateUpper(matrix, rowWeights, rowStart, rowEnd, out);
}

/** The kernel of both: weights null mean 1 (multiplying by 1 is exact, so both agree bit for bit). */
function accumulateUpper(
  matrix: Matrix,
  rowWeights: Float64Array | null,
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
    const weightA = rowWeights === null ? 1 : rowWeights[row];
    const weightB = rowWeights === null ? 1 : rowWeights[row + 1];
    const weightC = rowWeights === null ? 1 : rowWeights[row + 2];
    const weightD = rowWeights === null ? 1 : rowWeights[row + 3];
    let j = 0;
    for (; j + 1 < cols; j += 2) {
      const aj = weightA * x[a + j];
      const bj = weightB * x[b + j];
      const cj = weightC * x[c + j];
      const dj = weightD * x[d + j];
      const aNext = weightA * x[a + j + 1];
      const bNext = weightB * x[b + j + 1];
      const cNext = weightC * x[c + j + 1];
      const dNext = weightD * x[d + j + 1];
      const base = j * cols;
      const nextBase = base + cols;
      out[base + j] += aj * x[a + j] + bj * x[b + j] + cj * x[c + j] + dj * x[d + j];
      for (let k = j + 1; k < cols; k++) {
        const xa = x[a + k];
        const xb = x[b + k];
        const xc = x[c + k];
        const xd = x[d + k];
        out[base + k] += aj * xa + bj * xb + cj * xc + dj * xd;
        out[nextBase + k] += aNext * xa + bNext * xb + cNext * xc + dNext * xd;
      }
    }
    if (j < cols) {
      const base = j * cols;
      out[base + j] +=
        weightA * x[a + j] * x[a + j] +
        weightB * x[b + j] * x[b + j] +
        weightC * x[c + j] * x[c + j] +
        weightD * x[d + j] * x[d + j];
    }
  }
  for (; row < rowEnd; row++) {
    const a = row * cols;
    const weight = rowWeights === null ? 1 : rowWeights[row];
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
