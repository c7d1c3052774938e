/**
 * Long reductions lose accuracy when summed left to right (error grows like n·ε). These helpers keep
 * it near ε: pairwise summation for arrays and a Neumaier-compensated accumulator for streams.
 */

const PAIRWISE_BLOCK = 128;

/**
 * Σ values[start..end) by pairwise (cascade) summation: split in halves until blocks of 128, which
 * are summed directly. Error bound O(ε log n) instead of O(ε n).
 * Source: Higham, "Accuracy and Stability of Numerical Algorithms", 2nd ed., §4.2 (from memory).
 *
 * Example: `sumPairwise(Float64Array.of(1, 2, 3))` is 6; on a million mixed-scale values its error
 * against Python's exactly rounded `math.fsum` stays below ε·20·Σ|x| (see the tests).
 */
export function sumPairwise(values: Float64Array, start = 0, end = values.length): number {
  const length = end - start;
  if (length <= PAIRWISE_BLOCK) {
    let total = 0;
    for (let index = start; index < end; index++) total += values[index];
    return total;
  }
  const middle = start + Math.floor(length / 2);
  return sumPairwise(values, start, middle) + sumPairwise(values, middle, end);
}

/**
 * What rounding lost when `sum` = fl(total + value) was computed, exactly: Neumaier's correction
 * term, the one step every compensated sum here takes (Neumaier, ZAMM 54 (1974), from memory).
 *
 * Example: roundingError(1e100, 1, 1e100 + 1) is 1.
 */
export function roundingError(total: number, value: number, sum: number): number {
  return Math.abs(total) >= Math.abs(value) ? total - sum + value : value - sum + total;
}

/**
 * A running sum with Neumaier's compensation (improved Kahan–Babuška): the rounding error of each
 * addition is carried in `compensation`, so the result is accurate to about ε regardless of length.
 * Source: Neumaier, ZAMM 54 (1974) (from memory).
 *
 * Example: adding 1, 1e100, 1, -1e100 gives 2 (naive summation gives 0).
 */
export class CompensatedSum {
  private total = 0;
  private compensation = 0;

  add(value: number): void {
    const next = this.total + value;
    this.compensation += roundingError(this.total, value, next);
    this.total = next;
  }

  get value(): number {
    return this.total + this.compensation;
  }
}

/**
 * Adds `source[i]` into `target[i]` for every i using per-element Neumaier compensation held in
 * `compensation` (same length). Used to merge block partial sums of long streams.
 *
 * Example: target [1], compensation [0], adding [1e100] then [-1e100] then [1] leaves
 * target + compensation = [2].
 */
export function addCompensated(
  target: Float64Array,
  compensation: Float64Array,
  source: Float64Array,
): void {
  for (let index = 0; index < target.length; index++) {
    const current = target[index];
    const value = source[index];
    const next = current + value;
    compensation[index] += roundingError(current, value, next);
    target[index] = next;
  }
}

/**
 * Dot product of `length` entries of a (from aOffset) and b (from bOffset), summed left to right:
 * used for short vectors (one row of a matrix), where the error n·ε is negligible.
 *
 * Example: dot([1, 2, 3], 0, [4, 5, 6], 0, 3) is 32.
 */
export function dot(
  a: Float64Array,
  aOffset: number,
  b: Float64Array,
  bOffset: number,
  length: number,
): number {
  let total = 0;
  for (let index = 0; index < length; index++) total += a[aOffset + index] * b[bOffset + index];
  return total;
}

/**
 * Squared Euclidean norm ‖v‖² = Σ vᵢ², scaled to avoid overflow and underflow: Σ (vᵢ/s)² · s² with
 * s = max |vᵢ| (the LAPACK `dnrm2` idea, from memory).
 *
 * Example: squaredNorm([3, 4]) is 25; squaredNorm([1e200, 1e200]) is Infinity only because the
 * true value 2e400 overflows, while norm([1e200, 1e200]) = √2·1e200 is finite.
 */
export function squaredNorm(values: Float64Array): number {
  const scale = maxAbs(values);
  // NaN stays NaN (as in `norm`); an infinite entry gives Infinity.
  if (scale === 0 || !Number.isFinite(scale)) return scale * scale;
  let total = 0;
  for (let index = 0; index < values.length; index++) {
    const scaled = values[index] / scale;
    total += scaled * scaled;
  }
  return total * scale * scale;
}

/**
 * Euclidean norm ‖v‖ with the same overflow-safe scaling as `squaredNorm`.
 *
 * Example: norm([3, 4]) is 5; norm([1e200, 1e200]) is 1.4142135623730951e200.
 */
export function norm(values: Float64Array): number {
  const scale = maxAbs(values);
  if (scale === 0 || !Number.isFinite(scale)) return scale;
  let total = 0;
  for (let index = 0; index < values.length; index++) {
    const scaled = values[index] / scale;
    total += scaled * scaled;
  }
  return Math.sqrt(total) * scale;
}

function maxAbs(values: Float64Array): number {
  let largest = 0;
  for (let index = 0; index < values.length; index++) {
    const magnitude = Math.abs(values[index]);
    if (magnitude > largest || Number.isNaN(magnitude)) largest = magnitude;
  }
  return largest;
}
