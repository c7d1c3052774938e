import { softmaxInPlace } from "../math/softmax";
import { addCompensated, roundingError } from "../math/summation";
import type { Design } from "./design";

/** What a pass reads of a design: the rows and their classes or targets. */
export type PassData = Pick<Design, "x" | "labels" | "targets">;

/**
 * Sums over a set of rows that every statistic of methods.md §2–§3 is built from, at one point W:
 * Σ ℓᵢ(W), Σ ∇ℓᵢ(W) (data term only, no regularizer) and Σ ‖∇ℓᵢ(W) − c‖² about a centre c: zero
 * (Σ ‖∇ℓᵢ‖², what digests send, methods.md §9), or, for the noise σ² of §3, the rows' own mean
 * gradient from an earlier pass at the same W, so the variance is summed from deviations (two
 * passes) instead of E‖∇ℓ‖² − ‖E∇ℓ‖², which cancels when the gradients sit close to their mean.
 * With centres the pass also sums Σ ‖∇ℓᵢ − c_pooled‖² about the mean over all rows, for σ²_pooled.
 * They are plain sums, so totals over chunks, shards, workers or machines merge by addition
 * (`mergeTotals`). Each sum carries a Neumaier compensation term, fed block by block.
 */
export interface PassTotals {
  rows: number;
  lossSum: number;
  lossCompensation: number;
  gradientSum: Float64Array;
  gradientCompensation: Float64Array;
  squaredGradientNormSum: number;
  squaredGradientNormCompensation: number;
  pooledSquaredDeviationSum: number;
  pooledSquaredDeviationCompensation: number;
}

/**
 * The centres a noise pass measures per-row gradients from: the mean data gradient of the rows'
 * shard and of all rows, C × (d + 1) each, row-major like W.
 */
export interface PassCentres {
  shard: Float64Array;
  pooled: Float64Array;
}

export function createTotals(parameterCount: number): PassTotals {
  return {
    rows: 0,
    lossSum: 0,
    lossCompensation: 0,
    gradientSum: new Float64Array(parameterCount),
    gradientCompensation: new Float64Array(parameterCount),
    squaredGradientNormSum: 0,
    squaredGradientNormCompensation: 0,
    pooledSquaredDeviationSum: 0,
    pooledSquaredDeviationCompensation: 0,
  };
}

/** Adds `source` into `target` (both from the same W). */
export function mergeTotals(target: PassTotals, source: PassTotals): void {
  target.rows += source.rows;
  addLoss(target, source.lossSum + source.lossCompensation);
  const combined = new Float64Array(source.gradientSum.length);
  for (let k = 0; k < combined.length; k++) {
    combined[k] = source.gradientSum[k] + source.gradientCompensation[k];
  }
  addCompensated(target.gradientSum, target.gradientCompensation, combined);
  addSquaredNorms(target, source.squaredGradientNormSum + source.squaredGradientNormCompensation);
  addPooledDeviations(
    target,
    source.pooledSquaredDeviationSum + source.pooledSquaredDeviationCompensation,
  );
}

/** The compensated value of each sum. */
export function readTotals(totals: PassTotals): {
  loss: number;
  gradient: Float64Array;
  squaredNorms: number;
  pooledSquaredDeviations: number;
} {
  const gradient = new Float64Array(totals.gradientSum.length);
  for (let k = 0; k < gradient.length; k++)
    gradient[k] = totals.gradientSum[k] + totals.gradientCompensation[k];
  return {
    loss: totals.lossSum + totals.lossCompensation,
    gradient,
    squaredNorms: totals.squaredGradientNormSum + totals.squaredGradientNormCompensation,
    pooledSquaredDeviations:
      totals.pooledSquaredDeviationSum + totals.pooledSquaredDeviationCompensation,
  };
}

/** Rows summed directly before their partial sums enter the compensated totals. */
const BLOCK_ROWS = 256;

/** Reusable workspace for `accumulatePass`, so the hot loop allocates nothing. */
export interface PassWorkspace {
  scores: Float64Array;
  blockGradient: Float64Array;
  /**
   * The block just summed: [Σ ℓᵢ, Σ ‖∇ℓᵢ − c‖², Σ ‖∇ℓᵢ − c_pooled‖²] (written here rather than
   * returned as a triple).
   */
  blockSums: Float64Array;
}

/**
 * Rows handled together by the softmax kernel, so each weight and gradient entry is loaded once per
 * group (and, two classes at a time, each row entry once per class pair).
 */
const ROW_GROUP = 4;

export function createWorkspace(classCount: number, width: number): PassWorkspace {
  return {
    scores: new Float64Array(ROW_GROUP * classCount),
    blockGradient: new Float64Array(classCount * width),
    blockSums: new Float64Array(3),
  };
}

/**
 * Adds rows [rowStart, rowEnd) of the design at W (C × (d + 1), row-major) into `totals`.
 *
 * Softmax (methods.md §2): sᵢ = W x̃ᵢ, ℓᵢ = logsumexp(sᵢ) − s_{i,yᵢ}, ∇ℓᵢ = (pᵢ − e_{yᵢ}) x̃ᵢᵀ and
 * ‖∇ℓᵢ‖² = ‖pᵢ − e_{yᵢ}‖² ‖x̃ᵢ‖². Least squares: rᵢ = wᵀx̃ᵢ − yᵢ, ℓᵢ = ½ rᵢ², ∇ℓᵢ = rᵢ x̃ᵢ,
 * ‖∇ℓᵢ‖² = rᵢ² ‖x̃ᵢ‖². The per-sample gradient is never formed: its norm factorizes (§3). With
 * `centres`, the squared norms are taken about them instead: ‖∇ℓᵢ − c‖² = Σ_cj (r_ic x̃_ij − c_cj)²,
 * which costs another C·(d + 1) multiply-adds per row, once per analysis.
 */
export function accumulatePass(
  design: PassData,
  weights: Float64Array,
  rowStart: number,
  rowEnd: number,
  totals: PassTotals,
  workspace: PassWorkspace,
  withSquaredNorms: boolean,
  centres: PassCentres | null = null,
): void {
  accumulateBlocks(
    design,
    weights,
    rowStart,
    rowEnd,
    totals,
    workspace,
    true,
    withSquaredNorms,
    centres,
  );
}

/**
 * Adds Σ ℓᵢ(W) of rows [rowStart, rowEnd) into `totals` and nothing else: the gradient sums are
 * left as they are, and the gradient's multiply-adds (half of them) are skipped; the softmax's
 * exponentials remain, so a softmax pass takes about two thirds of the time. The loss goes through
 * the same arithmetic in the same order, so it is the same bit for bit as the loss
 * `accumulatePass` adds — for evaluations that need F but not ∇F, such as the simulation's
 * suboptimality curve (methods.md §7).
 */
export function accumulateLoss(
  design: PassData,
  weights: Float64Array,
  rowStart: number,
  rowEnd: number,
  totals: PassTotals,
  workspace: PassWorkspace,
): void {
  accumulateBlocks(design, weights, rowStart, rowEnd, totals, workspace, false, false, null);
}

/** The pass itself, block by block; without `withGradient` no gradient entry is touched. */
function accumulateBlocks(
  design: PassData,
  weights: Float64Array,
  rowStart: number,
  rowEnd: number,
  totals: PassTotals,
  workspace: PassWorkspace,
  withGradient: boolean,
  withSquaredNorms: boolean,
  centres: PassCentres | null,
): void {
  for (let blockStart = rowStart; blockStart < rowEnd; blockStart += BLOCK_ROWS) {
    const blockEnd = Math.min(rowEnd, blockStart + BLOCK_ROWS);
    if (withGradient) workspace.blockGradient.fill(0);
    if (design.labels !== null) {
      accumulateSoftmaxBlock(
        design,
        design.labels,
        weights,
        blockStart,
        blockEnd,
        workspace,
        withGradient,
        withSquaredNorms,
        centres,
      );
    } else {
      accumulateLeastSquaresBlock(
        design,
        design.targets as Float64Array,
        weights,
        blockStart,
        blockEnd,
        workspace,
        withGradient,
        withSquaredNorms,
        centres,
      );
    }
    totals.rows += blockEnd - blockStart;
    addLoss(totals, workspace.blockSums[0]);
    if (!withGradient) continue;
    addSquaredNorms(totals, workspace.blockSums[1]);
    addPooledDeviations(totals, workspace.blockSums[2]);
    addCompensated(totals.gradientSum, totals.gradientCompensation, workspace.blockGradient);
  }
}

function accumulateSoftmaxBlock(
  design: PassData,
  labels: Int32Array,
  weights: Float64Array,
  rowStart: number,
  rowEnd: number,
  workspace: PassWorkspace,
  withGradient: boolean,
  withSquaredNorms: boolean,
  centres: PassCentres | null,
): void {
  const width = design.x.cols;
  const x = design.x.data;
  const classCount = weights.length / width;
  const scores = workspace.scores;
  const gradient = workspace.blockGradient;
  let loss = 0;
  let squaredNorms = 0;
  let pooledDeviations = 0;
  let row = rowStart;
  for (; row + ROW_GROUP <= rowEnd; row += ROW_GROUP) {
    const base0 = row * width;
    const base1 = base0 + width;
    const base2 = base1 + width;
    const base3 = base2 + width;
    // Two classes at a time: each x value loaded feeds two sums (eight sums fit in registers).
    let c = 0;
    for (; c + 1 < classCount; c += 2) {
      const weightBaseA = c * width;
      const weightBaseB = weightBaseA + width;
      let scoreA0 = 0;
      let scoreA1 = 0;
      let scoreA2 = 0;
      let scoreA3 = 0;
      let scoreB0 = 0;
      let scoreB1 = 0;
      let scoreB2 = 0;
      let scoreB3 = 0;
      for (let j = 0; j < width; j++) {
        const weightA = weights[weightBaseA + j];
        const weightB = weights[weightBaseB + j];
        const x0 = x[base0 + j];
        const x1 = x[base1 + j];
        const x2 = x[base2 + j];
        const x3 = x[base3 + j];
        scoreA0 += weightA * x0;
        scoreA1 += weightA * x1;
        scoreA2 += weightA * x2;
        scoreA3 += weightA * x3;
        scoreB0 += weightB * x0;
        scoreB1 += weightB * x1;
        scoreB2 += weightB * x2;
        scoreB3 += weightB * x3;
      }
      scores[c] = scoreA0;
      scores[classCount + c] = scoreA1;
      scores[2 * classCount + c] = scoreA2;
      scores[3 * classCount + c] = scoreA3;
      scores[c + 1] = scoreB0;
      scores[classCount + c + 1] = scoreB1;
      scores[2 * classCount + c + 1] = scoreB2;
      scores[3 * classCount + c + 1] = scoreB3;
    }
    if (c < classCount) {
      const weightBase = c * width;
      let score0 = 0;
      let score1 = 0;
      let score2 = 0;
      let score3 = 0;
      for (let j = 0; j < width; j++) {
        const weight = weights[weightBase + j];
        score0 += weight * x[base0 + j];
        score1 += weight * x[base1 + j];
        score2 += weight * x[base2 + j];
        score3 += weight * x[base3 + j];
      }
      scores[c] = score0;
      scores[classCount + c] = score1;
      scores[2 * classCount + c] = score2;
      scores[3 * classCount + c] = score3;
    }
    for (let k = 0; k < ROW_GROUP; k++) {
      const offset = k * classCount;
      const label = offset + labels[row + k];
      const labelScore = scores[label];
      loss += softmaxInPlace(scores, offset, classCount) - labelScore;
      if (!withGradient) continue;
      scores[label] -= 1;
      if (!withSquaredNorms) continue;
      const base = (row + k) * width;
      if (centres === null) {
        squaredNorms += squaredResidualTimesRowNorm(scores, offset, classCount, x, base, width);
      } else {
        squaredNorms += squaredDeviation(scores, offset, classCount, x, base, centres.shard);
        pooledDeviations += squaredDeviation(scores, offset, classCount, x, base, centres.pooled);
      }
    }
    if (!withGradient) continue;
    for (c = 0; c + 1 < classCount; c += 2) {
      const residualA0 = scores[c];
      const residualA1 = scores[classCount + c];
      const residualA2 = scores[2 * classCount + c];
      const residualA3 = scores[3 * classCount + c];
      const residualB0 = scores[c + 1];
      const residualB1 = scores[classCount + c + 1];
      const residualB2 = scores[2 * classCount + c + 1];
      const residualB3 = scores[3 * classCount + c + 1];
      const gradientBaseA = c * width;
      const gradientBaseB = gradientBaseA + width;
      for (let j = 0; j < width; j++) {
        const x0 = x[base0 + j];
        const x1 = x[base1 + j];
        const x2 = x[base2 + j];
        const x3 = x[base3 + j];
        gradient[gradientBaseA + j] +=
          residualA0 * x0 + residualA1 * x1 + residualA2 * x2 + residualA3 * x3;
        gradient[gradientBaseB + j] +=
          residualB0 * x0 + residualB1 * x1 + residualB2 * x2 + residualB3 * x3;
      }
    }
    if (c < classCount) {
      const residual0 = scores[c];
      const residual1 = scores[classCount + c];
      const residual2 = scores[2 * classCount + c];
      const residual3 = scores[3 * classCount + c];
      const gradientBase = c * width;
      for (let j = 0; j < width; j++) {
        gradient[gradientBase + j] +=
          residual0 * x[base0 + j] +
          residual1 * x[base1 + j] +
          residual2 * x[base2 + j] +
          residual3 * x[base3 + j];
      }
    }
  }
  for (; row < rowEnd; row++) {
    const base = row * width;
    for (let c = 0; c < classCount; c++) {
      const weightBase = c * width;
      let score = 0;
      for (let j = 0; j < width; j++) score += weights[weightBase + j] * x[base + j];
      scores[c] = score;
    }
    const label = labels[row];
    const labelScore = scores[label];
    loss += softmaxInPlace(scores, 0, classCount) - labelScore;
    if (!withGradient) continue;
    scores[label] -= 1;
    if (withSquaredNorms) {
      if (centres === null) {
        squaredNorms += squaredResidualTimesRowNorm(scores, 0, classCount, x, base, width);
      } else {
        squaredNorms += squaredDeviation(scores, 0, classCount, x, base, centres.shard);
        pooledDeviations += squaredDeviation(scores, 0, classCount, x, base, centres.pooled);
      }
    }
    for (let c = 0; c < classCount; c++) {
      const residual = scores[c];
      const gradientBase = c * width;
      for (let j = 0; j < width; j++) gradient[gradientBase + j] += residual * x[base + j];
    }
  }
  workspace.blockSums[0] = loss;
  workspace.blockSums[1] = squaredNorms;
  workspace.blockSums[2] = pooledDeviations;
}

/** ‖pᵢ − e_yᵢ‖² · ‖x̃ᵢ‖², the squared norm of the per-sample gradient (methods.md §3). */
function squaredResidualTimesRowNorm(
  residuals: Float64Array,
  offset: number,
  classCount: number,
  x: Float64Array,
  base: number,
  width: number,
): number {
  let residualNorm = 0;
  for (let c = 0; c < classCount; c++)
    residualNorm += residuals[offset + c] * residuals[offset + c];
  let rowNorm = 0;
  for (let j = 0; j < width; j++) rowNorm += x[base + j] * x[base + j];
  return residualNorm * rowNorm;
}

/**
 * ‖rᵢ x̃ᵢᵀ − c‖², the squared distance of the per-sample gradient from a centre c (C × width,
 * C = residuals counted from `offset`, width = c.length / C), formed entry by entry so that nothing
 * cancels when the gradient is close to c (methods.md §3, σₘ² by two passes).
 *
 * Example: residuals [1], row [2, 1] and c = [2, 0] give (2 − 2)² + (1 − 0)² = 1.
 */
function squaredDeviation(
  residuals: Float64Array,
  offset: number,
  classCount: number,
  x: Float64Array,
  base: number,
  centre: Float64Array,
): number {
  const width = centre.length / classCount;
  let total = 0;
  for (let c = 0; c < classCount; c++) {
    const residual = residuals[offset + c];
    const centreBase = c * width;
    for (let j = 0; j < width; j++) {
      const difference = residual * x[base + j] - centre[centreBase + j];
      total += difference * difference;
    }
  }
  return total;
}

function accumulateLeastSquaresBlock(
  design: PassData,
  targets: Float64Array,
  weights: Float64Array,
  rowStart: number,
  rowEnd: number,
  workspace: PassWorkspace,
  withGradient: boolean,
  withSquaredNorms: boolean,
  centres: PassCentres | null,
): void {
  const width = design.x.cols;
  const x = design.x.data;
  const gradient = workspace.blockGradient;
  const residuals = workspace.scores;
  let loss = 0;
  let squaredNorms = 0;
  let pooledDeviations = 0;
  for (let row = rowStart; row < rowEnd; row++) {
    const base = row * width;
    let residual = -targets[row];
    for (let j = 0; j < width; j++) residual += weights[j] * x[base + j];
    loss += 0.5 * residual * residual;
    if (!withGradient) continue;
    if (withSquaredNorms) {
      if (centres === null) {
        let rowNorm = 0;
        for (let j = 0; j < width; j++) rowNorm += x[base + j] * x[base + j];
        squaredNorms += residual * residual * rowNorm;
      } else {
        residuals[0] = residual;
        squaredNorms += squaredDeviation(residuals, 0, 1, x, base, centres.shard);
        pooledDeviations += squaredDeviation(residuals, 0, 1, x, base, centres.pooled);
      }
    }
    for (let j = 0; j < width; j++) gradient[j] += residual * x[base + j];
  }
  workspace.blockSums[0] = loss;
  workspace.blockSums[1] = squaredNorms;
  workspace.blockSums[2] = pooledDeviations;
}

/** Adds `value` to the compensated loss sum (Neumaier). */
function addLoss(totals: PassTotals, value: number): void {
  const next = totals.lossSum + value;
  totals.lossCompensation += roundingError(totals.lossSum, value, next);
  totals.lossSum = next;
}

/** Adds `value` to the compensated sum of squared deviations about the pooled centre (Neumaier). */
function addPooledDeviations(totals: PassTotals, value: number): void {
  const next = totals.pooledSquaredDeviationSum + value;
  totals.pooledSquaredDeviationCompensation += roundingError(
    totals.pooledSquaredDeviationSum,
    value,
    next,
  );
  totals.pooledSquaredDeviationSum = next;
}

/** Adds `value` to the compensated sum of squared per-row gradient norms (Neumaier). */
function addSquaredNorms(totals: PassTotals, value: number): void {
  const next = totals.squaredGradientNormSum + value;
  totals.squaredGradientNormCompensation += roundingError(
    totals.squaredGradientNormSum,
    value,
    next,
  );
  totals.squaredGradientNormSum = next;
}
