import type { Matrix } from "./matrix";

export interface LargestEigenvalueOptions {
  /** Stop when successive Rayleigh quotients differ by at most this fraction. */
  relativeTolerance?: number;
  maxIterations?: number;
}

/**
 * λ_max of a symmetric positive semi-definite matrix by power iteration with Rayleigh quotients.
 *
 * Method: v ← A v / ‖A v‖ from a fixed start vector vᵢ = 1 + i/(7n) (all ones, plus a small tilt so
 * it is not orthogonal to the top eigenvector of common structured matrices); the estimate is the
 * Rayleigh quotient vᵀ A v, which converges like (λ₂/λ₁)^{2k}.
 * Source: Golub & Van Loan, "Matrix Computations", §8.2.1 (from memory).
 *
 * Example: A = [[2, 1], [1, 2]] gives 3.
 */
export function largestEigenvalueSymmetric(
  matrix: Matrix,
  { relativeTolerance = 1e-13, maxIterations = 20_000 }: LargestEigenvalueOptions = {},
): number {
  const size = matrix.rows;
  if (matrix.cols !== size)
    throw new RangeError("largestEigenvalueSymmetric needs a square matrix");
  if (size === 0) return 0;
  const a = matrix.data;
  let vector = new Float64Array(size);
  let product = new Float64Array(size);
  for (let index = 0; index < size; index++) vector[index] = 1 + index / (7 * size);
  normalizeInPlace(vector);
  let estimate = 0;
  for (let iteration = 0; iteration < maxIterations; iteration++) {
    for (let row = 0; row < size; row++) {
      let total = 0;
      for (let col = 0; col < size; col++) total += a[row * size + col] * vector[col];
      product[row] = total;
    }
    let rayleigh = 0;
    for (let index = 0; index < size; index++) rayleigh += vector[index] * product[index];
    const length = normalizeInPlace(product);
    if (length === 0) return 0;
    const swap = vector;
    vector = product;
    product = swap;
    if (iteration > 0 && Math.abs(rayleigh - estimate) <= relativeTolerance * Math.abs(rayleigh)) {
      return rayleigh;
    }
    estimate = rayleigh;
  }
  return estimate;
}

function normalizeInPlace(vector: Float64Array): number {
  let total = 0;
  for (let index = 0; index < vector.length; index++) total += vector[index] * vector[index];
  const length = Math.sqrt(total);
  if (length > 0) for (let index = 0; index < vector.length; index++) vector[index] /= length;
  return length;
}
