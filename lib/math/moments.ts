import { CompensatedSum } from "./summation";

const BLOCK = 1024;

export interface Moments {
  mean: number;
  /** Population standard deviation √((1/n) Σ (xᵢ − mean)²). */
  std: number;
}

/**
 * Mean and population standard deviation of values (all finite), by the two-pass method
 * (mean first, then the mean squared deviation), with every term scaled by s, the power of two at
 * or above max |xᵢ| (kept within the normal range), so huge values near 1e308 neither overflow nor
 * lose the variance, and with blockwise sums merged by a compensated sum. A power of two makes the
 * scaling exact: scaling by max |xᵢ| itself rounds every term, which loses digits of a small spread
 * about a large mean (std/mean near ε) and overflows 1/s for subnormal values.
 * Sources: Chan, Golub & LeVeque, Amer. Statistician 37(3), 1983 (two-pass is the accurate
 * baseline; from memory); scaling as in LAPACK's dnrm2 (from memory).
 *
 * Example: measureMoments([2, 4, 4, 4, 5, 5, 7, 9]) is { mean: 5, std: 2 }.
 */
export function measureMoments(values: Float64Array): Moments {
  return measureColumnMoments(values, values.length, 1, [0])[0];
}

/**
 * `measureMoments` of several columns of a row-major table at once (rows × stride values; column
 * k is values[row · stride + k]), in row order, so a wide table is read sequentially a few times
 * instead of once per column. Same blocks and sums per column as `measureMoments`, so the same
 * results bit for bit.
 *
 * Example: the columns of [[2, 5], [4, 5], [4, 7], [4, 9]] (stride 2) are { mean: 3.5, std:
 * 0.8660254037844386 } and { mean: 6.5, std: 1.6583123951777 }.
 */
export function measureColumnMoments(
  values: Float64Array,
  rows: number,
  stride: number,
  columns: readonly number[],
): Moments[] {
  return measureColumnMomentsInBlocks((visit) => visit(values, rows), rows, stride, columns);
}

/**
 * Rows of a row-major table visited in order, block by block: `visit` gets each block's values and
 * row count (a block may be read into a reused buffer, so it is not kept).
 */
export type RowBlockVisitor = (visit: (values: Float64Array, rowCount: number) => void) => void;

/** Rows per partial sum; blocks given to `measureColumnMomentsInBlocks` are multiples of it. */
export const MOMENT_BLOCK_ROWS = BLOCK;

/**
 * `measureColumnMoments` of a table read block by block (three times: for the scales, the means and
 * the deviations), for tables kept outside memory. Every block but the last must hold a multiple
 * of MOMENT_BLOCK_ROWS rows; the partial sums then fall exactly where one table's do, so the results
 * are the same bit for bit.
 */
export function measureColumnMomentsInBlocks(
  forEachBlock: RowBlockVisitor,
  rows: number,
  stride: number,
  columns: readonly number[],
): Moments[] {
  const count = columns.length;
  if (rows === 0) return columns.map(() => ({ mean: Number.NaN, std: Number.NaN }));
  const scales = new Float64Array(count);
  forEachBlock((values, blockRows) => {
    for (let row = 0; row < blockRows; row++) {
      const base = row * stride;
      for (let k = 0; k < count; k++) {
        scales[k] = Math.max(scales[k], Math.abs(values[base + columns[k]]));
      }
    }
  });
  for (let k = 0; k < count; k++) scales[k] = powerOfTwoAtLeast(scales[k]);
  const inverses = scales.map((scale) => 1 / scale);

  const blocks = new Float64Array(count);
  const totals = columns.map(() => new CompensatedSum());
  forEachBlock((values, blockRows) => {
    for (let start = 0; start < blockRows; start += BLOCK) {
      const end = Math.min(blockRows, start + BLOCK);
      blocks.fill(0);
      for (let row = start; row < end; row++) {
        const base = row * stride;
        for (let k = 0; k < count; k++) blocks[k] += values[base + columns[k]] * inverses[k];
      }
      for (let k = 0; k < count; k++) totals[k].add(blocks[k]);
    }
  });
  const scaledMeans = totals.map((total) => total.value / rows);

  const squares = columns.map(() => new CompensatedSum());
  forEachBlock((values, blockRows) => {
    for (let start = 0; start < blockRows; start += BLOCK) {
      const end = Math.min(blockRows, start + BLOCK);
      blocks.fill(0);
      for (let row = start; row < end; row++) {
        const base = row * stride;
        for (let k = 0; k < count; k++) {
          const deviation = values[base + columns[k]] * inverses[k] - scaledMeans[k];
          blocks[k] += deviation * deviation;
        }
      }
      for (let k = 0; k < count; k++) squares[k].add(blocks[k]);
    }
  });
  return columns.map((_, k) => ({
    mean: scaledMeans[k] * scales[k],
    std: Math.sqrt(squares[k].value / rows) * scales[k],
  }));
}

/** Smallest and largest exponents e whose 2^e and 2^−e are both normal doubles. */
const NORMAL_EXPONENTS = [-1022, 1022] as const;

/**
 * 2^e ≥ `magnitude` with e clamped to the normal range: scaling by it and by its inverse is exact,
 * where 1/`magnitude` would round (and overflow for subnormal magnitudes). Values near the largest
 * double scaled by 2^−1022 stay below 4. A column of zeros gets 2^−1022 too (log₂ 0 is −∞), so its
 * scaled terms stay 0 and need no case of their own.
 *
 * Example: powerOfTwoAtLeast(3) is 4; powerOfTwoAtLeast(1e-310) and powerOfTwoAtLeast(0) are 2^−1022.
 */
function powerOfTwoAtLeast(magnitude: number): number {
  const [lowest, highest] = NORMAL_EXPONENTS;
  return 2 ** Math.min(highest, Math.max(lowest, Math.ceil(Math.log2(magnitude))));
}
