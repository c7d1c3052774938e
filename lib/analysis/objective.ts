import type { Design } from "./design";
import {
  accumulatePass,
  createTotals,
  createWorkspace,
  readTotals,
  type PassTotals,
} from "./objective-pass";

/** Number of weight rows: C for softmax, 1 for least squares. */
export function countWeightRows(design: Pick<Design, "classes">): number {
  return design.classes === null ? 1 : design.classes.length;
}

/** Adds the regularizer's gradient λ·W (bias column excluded) to `gradient` (methods.md §2). */
export function addRegularizerGradient(
  weights: Float64Array,
  width: number,
  lambda: number,
  gradient: Float64Array,
): void {
  for (let k = 0; k < weights.length; k++) {
    if (k % width !== width - 1) gradient[k] += lambda * weights[k];
  }
}

/**
 * The regularizer (λ/2)‖W without its bias column‖² (methods.md §2).
 *
 * Example: W = [[1, 2, 5]] (the last column the bias) with λ = 0.1 gives 0.05 · (1 + 4) = 0.25.
 */
export function computePenalty(weights: Float64Array, width: number, lambda: number): number {
  let squared = 0;
  for (let k = 0; k < weights.length; k++) {
    if (k % width !== width - 1) squared += weights[k] * weights[k];
  }
  return 0.5 * lambda * squared;
}

export interface ObjectiveValue {
  /** F_S(W) = (1/|S|) Σ ℓᵢ + (λ/2)‖W_nb‖². */
  value: number;
  /** ∇F_S(W), regularizer included. */
  gradient: Float64Array;
  /** (1/|S|) Σ ‖∇ℓᵢ‖² when requested (data term only), else NaN. */
  meanSquaredSampleNorm: number;
  /** (1/|S|) Σ ∇ℓᵢ (data term only). */
  dataGradient: Float64Array;
  rows: number;
}

/**
 * F over rows [rowStart, rowEnd) of the design (default all) and its gradient, in one pass.
 *
 * Example: for any design, W = 0 with C classes gives F = ln C (every pᵢ is uniform).
 */
export function evaluateObjective(
  design: Design,
  weights: Float64Array,
  lambda: number,
  { rowStart = 0, rowEnd = design.x.rows, withSquaredNorms = false } = {},
): ObjectiveValue {
  const width = design.x.cols;
  const totals = createTotals(weights.length);
  accumulatePass(
    design,
    weights,
    rowStart,
    rowEnd,
    totals,
    createWorkspace(weights.length / width, width),
    withSquaredNorms,
  );
  return finishPass(totals, weights, width, lambda, withSquaredNorms);
}

/** The objective of the rows a pass summed (their means, plus the regularizer). */
export function finishPass(
  totals: PassTotals,
  weights: Float64Array,
  width: number,
  lambda: number,
  withSquaredNorms: boolean,
): ObjectiveValue {
  return finishObjective(readTotals(totals), totals.rows, weights, width, lambda, withSquaredNorms);
}

/** Turns row sums into means and adds the regularizer. */
export function finishObjective(
  sums: { loss: number; gradient: Float64Array; squaredNorms: number },
  rows: number,
  weights: Float64Array,
  width: number,
  lambda: number,
  withSquaredNorms: boolean,
): ObjectiveValue {
  const dataGradient = sums.gradient.map((value) => value / rows);
  const gradient = Float64Array.from(dataGradient);
  addRegularizerGradient(weights, width, lambda, gradient);
  return {
    value: sums.loss / rows + computePenalty(weights, width, lambda),
    gradient,
    meanSquaredSampleNorm: withSquaredNorms ? sums.squaredNorms / rows : Number.NaN,
    dataGradient,
    rows,
  };
}
