import { choleskyDecompose, choleskySolveInPlace } from "../math/cholesky";
import { minimizeLbfgs } from "../math/lbfgs";
import { createMatrix, matrixFromValues } from "../math/matrix";
import { norm } from "../math/summation";
import type { Design } from "./design";
import { countWeightRows, evaluateObjective } from "./objective";

/** ‖∇F(W*)‖ ≤ this × max(1, ‖∇F(0)‖) (methods.md §2). */
export const OPTIMUM_RELATIVE_TOLERANCE = 1e-8;
/** Above this many rows the fit first solves on an evenly strided subsample of about this size. */
const WARM_START_ROWS = 50_000;

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
}

/**
 * Solves W* = argmin F (methods.md §2) to ‖∇F(W*)‖ ≤ 1e-8·max(1, ‖∇F(0)‖).
 *
 * Least squares: the normal equations (G + Λ) w = X̃ᵀy/N with G = X̃ᵀX̃/N and Λ = λ off the bias,
 * by Cholesky, refined by exact Newton steps until the tolerance holds.
 * Softmax: L-BFGS, warm-started on a strided subsample when there are many rows. Every L-BFGS
 * direction is a combination of gradients, and gradients never move the class intercepts' sum, so
 * starting from zero keeps the intercepts summing to zero: the minimum-norm optimum (methods.md §2).
 * (Preconditioning with Böhning's constant bound ½(I − 11ᵀ/C) ⊗ G + λI was tried and needed over
 * twice the iterations on the benchmark data: the bound is loose where predictions are confident.)
 * `gram` is G (width × width), used by the least-squares solve.
 */
export function fitReferenceModel(
  design: Design,
  gram: Float64Array,
  lambda: number,
  onProgress?: (fraction: number) => void,
): FittedModel {
  const width = design.x.cols;
  const weightRows = countWeightRows(design);
  const start = new Float64Array(weightRows * width);
  const atZero = evaluateObjective(design, start, lambda);
  const tolerance = OPTIMUM_RELATIVE_TOLERANCE * Math.max(1, norm(atZero.gradient));
  const reportGradient = (gradientNorm: number) => {
    const span = Math.log(Math.max(norm(atZero.gradient), tolerance * 10) / tolerance);
    onProgress?.(
      Math.min(1, Math.max(0, 1 - Math.log(Math.max(gradientNorm, tolerance) / tolerance) / span)),
    );
  };

  if (design.classes === null) {
    return solveLeastSquares(design, gram, lambda, atZero.gradient, tolerance);
  }

  let evaluations = 1;
  let warmStart: Float64Array = start;
  const stride = Math.floor(design.x.rows / WARM_START_ROWS);
  if (stride >= 2) {
    const sample = subsampleDesign(design, stride);
    const rough = minimizeLbfgs(
      (weights, gradient) => {
        const result = evaluateObjective(sample, weights, lambda);
        gradient.set(result.gradient);
        return result.value;
      },
      start,
      { gradientTolerance: tolerance * 100, maxIterations: 2000 },
    );
    warmStart = rough.x;
  }
  const result = minimizeLbfgs(
    (weights, gradient) => {
      const evaluation = evaluateObjective(design, weights, lambda);
      evaluations++;
      gradient.set(evaluation.gradient);
      return evaluation.value;
    },
    warmStart,
    {
      gradientTolerance: tolerance,
      maxIterations: 5000,
      onIteration: (_, g) => reportGradient(g),
    },
  );
  centerIntercepts(result.x, width, weightRows);
  return {
    weights: result.x,
    value: result.value,
    gradientNorm: result.gradientNorm,
    tolerance,
    converged: result.converged,
    iterations: result.iterations,
    evaluations,
  };
}

function solveLeastSquares(
  design: Design,
  gram: Float64Array,
  lambda: number,
  gradientAtZero: Float64Array,
  tolerance: number,
): FittedModel {
  const width = design.x.cols;
  const system = matrixFromValues(width, width, Float64Array.from(gram));
  for (let j = 0; j < width - 1; j++) system.data[j * width + j] += lambda;
  const lower = createMatrix(width, width);
  choleskyDecompose(system, lower);
  // ∇F(0) = −X̃ᵀy/N, so W* = −(G + Λ)⁻¹ ∇F(0); refine with Newton steps on the true gradient.
  const weights = gradientAtZero.map((value) => -value);
  choleskySolveInPlace(lower, weights);
  let evaluation = evaluateObjective(design, weights, lambda);
  let evaluations = 2;
  for (let step = 0; step < 5 && norm(evaluation.gradient) > tolerance; step++) {
    const correction = Float64Array.from(evaluation.gradient);
    choleskySolveInPlace(lower, correction);
    for (let k = 0; k < width; k++) weights[k] -= correction[k];
    evaluation = evaluateObjective(design, weights, lambda);
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
function centerIntercepts(weights: Float64Array, width: number, classCount: number): void {
  let mean = 0;
  for (let c = 0; c < classCount; c++) mean += weights[c * width + width - 1] / classCount;
  for (let c = 0; c < classCount; c++) weights[c * width + width - 1] -= mean;
}

/** Every `stride`-th row (rows are grouped by shard, so each shard is represented in proportion). */
function subsampleDesign(design: Design, stride: number): Design {
  const width = design.x.cols;
  const rows = Math.ceil(design.x.rows / stride);
  const x = createMatrix(rows, width);
  const labels = design.labels ? new Int32Array(rows) : null;
  for (let k = 0; k < rows; k++) {
    x.data.set(design.x.data.subarray(k * stride * width, (k * stride + 1) * width), k * width);
    if (labels && design.labels) labels[k] = design.labels[k * stride];
  }
  return { ...design, x, labels };
}
