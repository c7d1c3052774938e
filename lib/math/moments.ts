import { CompensatedSum } from "./summation";

const BLOCK = 1024;

export interface Moments {
  mean: number;
  /** Population standard deviation √((1/n) Σ (xᵢ − mean)²). */
  std: number;
}

/**
 * Mean and population standard deviation of values (all finite), by the two-pass method
 * (mean first, then the mean squared deviation), with every term divided by s = max |xᵢ| so huge
 * values near 1e308 neither overflow nor lose the variance, and with blockwise sums merged by a
 * compensated sum. Sources: Chan, Golub & LeVeque, Amer. Statistician 37(3), 1983 (two-pass is the
 * accurate baseline; from memory); scaling as in LAPACK's dnrm2 (from memory).
 *
 * Example: measureMoments([2, 4, 4, 4, 5, 5, 7, 9]) is { mean: 5, std: 2 }.
 */
export function measureMoments(values: Float64Array): Moments {
  return measureMomentsOfChunks([values]);
}

/**
 * `measureMoments` of the values held in several arrays, taken in order as one sequence (a column
 * read in chunks), without copying them together. Blocks of 1024 never cross a chunk border.
 *
 * Example: measureMomentsOfChunks([[2, 4, 4, 4], [5, 5, 7, 9]]) is { mean: 5, std: 2 }.
 */
export function measureMomentsOfChunks(chunks: readonly Float64Array[]): Moments {
  let count = 0;
  let scale = 0;
  for (const values of chunks) {
    count += values.length;
    for (let index = 0; index < values.length; index++) {
      scale = Math.max(scale, Math.abs(values[index]));
    }
  }
  if (count === 0) return { mean: Number.NaN, std: Number.NaN };
  if (scale === 0) return { mean: 0, std: 0 };
  const inverse = 1 / scale;

  const total = new CompensatedSum();
  for (const values of chunks) {
    for (let start = 0; start < values.length; start += BLOCK) {
      const end = Math.min(values.length, start + BLOCK);
      let block = 0;
      for (let index = start; index < end; index++) block += values[index] * inverse;
      total.add(block);
    }
  }
  const scaledMean = total.value / count;

  const squares = new CompensatedSum();
  for (const values of chunks) {
    for (let start = 0; start < values.length; start += BLOCK) {
      const end = Math.min(values.length, start + BLOCK);
      let block = 0;
      for (let index = start; index < end; index++) {
        const deviation = values[index] * inverse - scaledMean;
        block += deviation * deviation;
      }
      squares.add(block);
    }
  }
  return { mean: scaledMean * scale, std: Math.sqrt(squares.value / count) * scale };
}
