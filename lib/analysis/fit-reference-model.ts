import { choleskyDecompose, choleskySolveInPlace } from "../math/cholesky";
import { minimizeLbfgs } from "../math/lbfgs";
import { createMatrix, matrixFromValues } from "../math/matrix";
import { norm } from "../math/summation";
import { isDesignOnDisk, type EncodedDesign } from "./design";
import { countWeightRows, finishPass, type ObjectiveValue } from "./objective";
import type { PassData } from "./objective-pass";
import type { DesignPasses, PassResult, SharedDesign } from "./pass-pool";
import { forEachStoredBlock } from "./stored-matrix";

/** ‖∇F(W*)‖ ≤ this × max(1, ‖∇F(0)‖) (methods.md §2). */
export const OPTIMUM_RELATIVE_TOLERANCE = 1e-8;
/**
 * The fit first solves on an evenly strided subsample of about this many rows (all rows when there
 * are fewer) and takes its Newton preconditioner from the same rows.
 */
const SAMPLE_ROWS = 20_000;
/** The subsample solve stops at this multiple of the final tolerance: a rough start is enough. */
const WARM_START_TOLERANCE_FACTOR = 1e4;
/**
 * Added to the preconditioner's diagonal, relative to its largest diagonal entry, so rounding can
 * never make the Cholesky factorization fail.
 */
const PRECONDITIONER_FLOOR = 1e-10;

export interface FittedModel {
  /** W*, C × (d + 1) row-major (1 × (d + 1) for least squares), class intercepts summing to zero. */
  weights: Float64Array;
  value: number;
  gradientNorm: number;
  /** The stopping threshold 1e-8·max(1, ‖∇F(0)‖). */
  tolerance: number;
  converged: boolean;
  /** L-BFGS iterations on all rows (0 for the least-squares solve). */
  iterations: number;
  /** Full-data objective evaluations (passes over the rows). */
  evaluations: number;
  /** The pass at W = 0 the tolerance came from, per shard (for the path point t = 0). */
  atZero: PassResult;
}

/**
 * Solves W* = argmin F (methods.md §2) to ‖∇F(W*)‖ ≤ 1e-8·max(1, ‖∇F(0)‖).
 *
 * Least squares: the normal equations (G + Λ) w = X̃ᵀy/N with G = X̃ᵀX̃/N and Λ = λ off the bias,
 * by Cholesky, refined by exact Newton steps until the tolerance holds.
 * Softmax: L-BFGS in three steps. (1) A rough solve on an evenly strided subsample of about 20 000
 * rows. (2) The exact Hessian of the subsample's objective at that point, factorized by Cholesky:
 * close to the full Hessian near the optimum and cheap to form. (3) L-BFGS on all rows from the
 * rough point with that Hessian as its initial inverse-curvature model (a preconditioner), which
 * needs about a third of the full passes plain L-BFGS needs on the benchmark data (a subsampled
 * Newton method; e.g. Byrd, Chin, Neveitt & Nocedal, SIAM J. Optim. 21(3), 2011, from memory).
 * Every L-BFGS direction is a combination of gradients and preconditioned gradients, and neither
 * moves the class intercepts' sum (the preconditioner's only flat direction, shifting every
 * intercept alike, is given curvature λ), so starting from zero keeps the intercepts summing to
 * zero: the minimum-norm optimum (methods.md §2); a final re-centring removes rounding drift.
 * Every pass over the rows goes through `passes`, which shares it among the pool's threads; the
 * subsample is shared with the same pool. `gram` is G (width × width), used by the least-squares
 * solve.
 */
export function fitReferenceModel(
  design: EncodedDesign,
  passes: DesignPasses,
  gram: Float64Array,
  lambda: number,
  onProgress?: (fraction: number) => void,
): FittedModel {
  const width = design.x.cols;
  const weightRows = countWeightRows(design);
  const start = new Float64Array(weightRows * width);
  const zeroPass = passes.evaluate(start, false);
  const atZero = finishPass(zeroPass.pooled, start, width, lambda, false);
  const tolerance = OPTIMUM_RELATIVE_TOLERANCE * Math.max(1, norm(atZero.gradient));
  const reportGradient = (gradientNorm: number) => {
    const span = Math.log(Math.max(norm(atZero.gradient), tolerance * 10) / tolerance);
    onProgress?.(
      Math.min(1, Math.max(0, 1 - Math.log(Math.max(gradientNorm, tolerance) / tolerance) / span)),
    );
  };

  if (design.classes === null) {
    const solved = solveLeastSquares(width, gram, lambda, atZero.gradient, tolerance, (weights) =>
      evaluatePooled(passes, weights, lambda),
    );
    return { ...solved, atZero: zeroPass };
  }

  const stride = computeSampleStride(design.x.rows);
  // With a stride of 1 the sample is all rows, chunked by shard as the passes over all rows are
  // (rows on disk are then copied into memory: fewer than 2 × SAMPLE_ROWS of them).
  const sample: SharedDesign =
    stride === 1 && !isDesignOnDisk(design)
      ? (passes as SharedDesign)
      : passes.pool.share(
          subsampleRows(design, stride),
          stride === 1 ? design.shardOffsets : Int32Array.of(0, Math.ceil(design.x.rows / stride)),
        );
  const fitted = fitSoftmax(
    {
      width,
      sampleIsAllRows: stride === 1,
      evaluate: (weights) => evaluatePooled(passes, weights, lambda),
      evaluateSample: (weights) => evaluatePooled(sample, weights, lambda),
      computeSampleHessian: (weights) => sample.computeSoftmaxHessian(weights, lambda),
    },
    start,
    tolerance,
    lambda,
    reportGradient,
  );
  return { ...fitted, atZero: zeroPass };
}

/** The subsample of the softmax fit's first step: every `stride`-th row of the shard-ordered rows. */
export function computeSampleStride(rows: number): number {
  return Math.max(1, Math.floor(rows / SAMPLE_ROWS));
}

/**
 * What the softmax fit reads of the rows — F and ∇F over all rows and over the strided subsample,
 * and ∇²F of the subsample (λ included) — whether the rows are at hand (passes over a design) or
 * held by clients that answer with sums (methods.md §9).
 */
export interface SoftmaxFitOracle {
  width: number;
  /** True when the stride is 1: the subsample is all rows. */
  sampleIsAllRows: boolean;
  evaluate(weights: Float64Array): ObjectiveValue;
  evaluateSample(weights: Float64Array): ObjectiveValue;
  computeSampleHessian(weights: Float64Array): Float64Array;
}

/**
 * The softmax steps of `fitReferenceModel` (see there) from `start` to ‖∇F‖ ≤ `tolerance`: the rough
 * solve on the subsample, its Newton preconditioner, preconditioned L-BFGS on all rows, intercepts
 * re-centred. `evaluations` counts full-data evaluations, the one at zero included.
 */
export function fitSoftmax(
  oracle: SoftmaxFitOracle,
  start: Float64Array,
  tolerance: number,
  lambda: number,
  reportGradient?: (gradientNorm: number) => void,
): Omit<FittedModel, "atZero"> {
  const width = oracle.width;
  const weightRows = start.length / width;
  const rough = minimizeLbfgs(
    (weights, gradient) => {
      const result = oracle.evaluateSample(weights);
      gradient.set(result.gradient);
      return result.value;
    },
    start,
    { gradientTolerance: tolerance * WARM_START_TOLERANCE_FACTOR, maxIterations: 2000 },
  );
  const precondition = createNewtonPreconditioner(
    oracle.computeSampleHessian(rough.x),
    width,
    start.length,
    lambda,
  );
  let evaluations = 1;
  const result = minimizeLbfgs(
    (weights, gradient) => {
      const evaluation = oracle.evaluate(weights);
      evaluations++;
      gradient.set(evaluation.gradient);
      return evaluation.value;
    },
    rough.x,
    {
      gradientTolerance: tolerance,
      maxIterations: 5000,
      precondition,
      onIteration: (_, g) => reportGradient?.(g),
    },
  );
  centerIntercepts(result.x, width, weightRows);
  const sampleIsAllRows = oracle.sampleIsAllRows;
  return {
    weights: result.x,
    value: result.value,
    gradientNorm: result.gradientNorm,
    tolerance,
    converged: result.converged,
    iterations: result.iterations + (sampleIsAllRows ? rough.iterations : 0),
    evaluations: evaluations + (sampleIsAllRows ? rough.evaluations : 0),
  };
}

/** F and ∇F over all rows of a shared design, in one pass. */
function evaluatePooled(
  passes: DesignPasses,
  weights: Float64Array,
  lambda: number,
): ObjectiveValue {
  const { pooled } = passes.evaluate(weights, false);
  return finishPass(pooled, weights, passes.x.cols, lambda, false);
}

/**
 * v ↦ M⁻¹v with M = ∇²F_S(W) + λ·I on the biases + ρ·I, from `hessian` = ∇²F_S(W) of the sample's
 * objective at W (size × size; modified in place).
 * The bias term makes the direction that shifts every intercept alike (flat for softmax) curved;
 * ρ = 1e-10 × the largest diagonal entry keeps the factorization clear of rounding.
 */
function createNewtonPreconditioner(
  hessian: Float64Array,
  width: number,
  size: number,
  lambda: number,
): (vector: Float64Array) => void {
  const known = preconditioners.get(hessian);
  if (known) return known;
  let largestDiagonal = 0;
  for (let k = 0; k < size; k++) largestDiagonal = Math.max(largestDiagonal, hessian[k * size + k]);
  const floor = PRECONDITIONER_FLOOR * largestDiagonal;
  for (let k = 0; k < size; k++) {
    hessian[k * size + k] += floor + (k % width === width - 1 ? lambda : 0);
  }
  const lower = createMatrix(size, size);
  choleskyDecompose(matrixFromValues(size, size, hessian), lower);
  const precondition = (vector: Float64Array) => choleskySolveInPlace(lower, vector);
  preconditioners.set(hessian, precondition);
  return precondition;
}

/**
 * Preconditioners by the Hessian array they were made from (and modified). The fit from digests
 * (digests/fit-pooled-optimum.ts) replays the fit after every round and hands over the same array
 * each time: its factorization, about (C·width)³/6 multiply-adds, is made once.
 */
const preconditioners = new WeakMap<Float64Array, (vector: Float64Array) => void>();

/**
 * Least squares' W* (methods.md §2): the normal equations (G + Λ) w = −∇F(0) by Cholesky, then
 * Newton steps on the true gradient (`evaluate`: F and ∇F over all rows) while it exceeds the
 * tolerance, at most five (`converged` says whether they sufficed). Shared by the central fit and the fit from merged digests (methods.md §9).
 */
export function solveLeastSquares(
  width: number,
  gram: Float64Array,
  lambda: number,
  gradientAtZero: Float64Array,
  tolerance: number,
  evaluate: (weights: Float64Array) => ObjectiveValue,
): Omit<FittedModel, "atZero"> {
  const system = matrixFromValues(width, width, Float64Array.from(gram));
  for (let j = 0; j < width - 1; j++) system.data[j * width + j] += lambda;
  const lower = createMatrix(width, width);
  choleskyDecompose(system, lower);
  // ∇F(0) = −X̃ᵀy/N, so W* = −(G + Λ)⁻¹ ∇F(0); refine with Newton steps on the true gradient.
  const weights = gradientAtZero.map((value) => -value);
  choleskySolveInPlace(lower, weights);
  let evaluation = evaluate(weights);
  let evaluations = 2;
  for (let step = 0; step < 5 && norm(evaluation.gradient) > tolerance; step++) {
    const correction = Float64Array.from(evaluation.gradient);
    choleskySolveInPlace(lower, correction);
    for (let k = 0; k < width; k++) weights[k] -= correction[k];
    evaluation = evaluate(weights);
    evaluations++;
  }
  const gradientNorm = norm(evaluation.gradient);
  return {
    weights,
    value: evaluation.value,
    gradientNorm,
    tolerance,
    converged: gradientNorm <= tolerance,
    iterations: 0,
    evaluations,
  };
}

/** Shifts class intercepts to sum to zero (the minimum-norm representative; F is unchanged). */
export function centerIntercepts(weights: Float64Array, width: number, classCount: number): void {
  let mean = 0;
  for (let c = 0; c < classCount; c++) mean += weights[c * width + width - 1] / classCount;
  for (let c = 0; c < classCount; c++) weights[c * width + width - 1] -= mean;
}

/**
 * Every `stride`-th row, in shared memory (rows are grouped by shard, so each shard is represented
 * in proportion).
 */
function subsampleRows(design: EncodedDesign, stride: number): PassData {
  const width = design.x.cols;
  const rows = Math.ceil(design.x.rows / stride);
  const x = createMatrix(rows, width, { shared: true });
  const labels = design.labels ? new Int32Array(rows) : null;
  const take = (values: Float64Array, firstRow: number, rowCount: number) => {
    for (let k = Math.ceil(firstRow / stride); k * stride < firstRow + rowCount; k++) {
      const row = k * stride - firstRow;
      x.data.set(values.subarray(row * width, (row + 1) * width), k * width);
    }
  };
  if (isDesignOnDisk(design)) forEachStoredBlock(design.x, take);
  else take(design.x.data, 0, design.x.rows);
  if (labels && design.labels) for (let k = 0; k < rows; k++) labels[k] = design.labels[k * stride];
  return { x, labels, targets: null };
}
