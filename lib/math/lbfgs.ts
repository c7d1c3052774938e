import { dot, norm } from "./summation";

/** Writes ∇f(x) into `gradient` and returns f(x). */
export type ValueAndGradient = (x: Float64Array, gradient: Float64Array) => number;

export interface LbfgsOptions {
  /** Stop when ‖∇f(x)‖ ≤ this (absolute). */
  gradientTolerance: number;
  maxIterations?: number;
  /** Number of (s, y) pairs kept. */
  memory?: number;
  /**
   * Applies a fixed symmetric positive definite approximation of the inverse Hessian to a vector in
   * place. Without it the initial inverse Hessian is the usual scaled identity.
   */
  precondition?: (vector: Float64Array) => void;
  onIteration?: (iteration: number, gradientNorm: number) => void;
}

export interface LbfgsResult {
  x: Float64Array;
  value: number;
  gradient: Float64Array;
  gradientNorm: number;
  iterations: number;
  evaluations: number;
  converged: boolean;
}

const ARMIJO_CONSTANT = 1e-4;
/** Hager–Zhang's approximate-Wolfe constants δ, σ and the allowed rounding rise ε of f. */
const WOLFE_DELTA = 0.1;
const WOLFE_SIGMA = 0.9;
const VALUE_ROUNDING_ALLOWANCE = 1e-10;
const MAX_LINE_SEARCH_STEPS = 50;

/**
 * Minimizes a smooth function by limited-memory BFGS.
 *
 * Method: the two-loop recursion builds d = −H_k ∇f from the last m pairs sᵢ = x_{i+1} − xᵢ,
 * yᵢ = ∇f_{i+1} − ∇fᵢ (Nocedal & Wright, "Numerical Optimization", 2nd ed., Algorithm 7.4; from
 * memory), with initial matrix γ·P where P is the optional preconditioner and γ = sᵀy / yᵀPy;
 * before any pair is stored, without P, the direction is −∇f shortened to at most unit length.
 * Each line search tries the step t = 1 first. The step is accepted by the Armijo condition
 * f(x + t d) ≤ f(x) + 10⁻⁴ t ∇fᵀd or, once f is flat to rounding near the optimum, by Hager &
 * Zhang's approximate Wolfe conditions (SIAM J. Optim. 16(1), 2005; from memory), which rely on the
 * directional derivative instead of f and so can reach gradients near 1e-8; otherwise it backtracks
 * to the minimizer of the quadratic through f(x), ∇fᵀd and f(x + t d), kept within [0.1 t, 0.5 t]
 * (safeguarded quadratic interpolation), or to 0.1 t where f(x + t d) is not finite.
 *
 * Example: f(x) = (x₀ − 1)² + 10 (x₁ + 2)² from x = (0, 0) converges to (1, −2) in a handful of
 * iterations.
 */
export function minimizeLbfgs(
  valueAndGradient: ValueAndGradient,
  start: Float64Array,
  { gradientTolerance, maxIterations = 1000, memory = 10, precondition, onIteration }: LbfgsOptions,
): LbfgsResult {
  const size = start.length;
  const x = Float64Array.from(start);
  const gradient = new Float64Array(size);
  const candidate = new Float64Array(size);
  const candidateGradient = new Float64Array(size);
  const direction = new Float64Array(size);
  const steps = Array.from({ length: memory }, () => new Float64Array(size));
  const changes = Array.from({ length: memory }, () => new Float64Array(size));
  const inverseCurvatures = new Float64Array(memory);
  const alphas = new Float64Array(memory);
  let stored = 0;
  let newest = -1;
  let scale = 1;

  let value = valueAndGradient(x, gradient);
  let evaluations = 1;
  let gradientNorm = norm(gradient);
  let iterations = 0;

  while (gradientNorm > gradientTolerance && iterations < maxIterations) {
    direction.set(gradient);
    for (let k = 0; k < stored; k++) {
      const slot = (newest - k + memory) % memory;
      const alpha = inverseCurvatures[slot] * dotProduct(steps[slot], direction);
      alphas[slot] = alpha;
      axpy(-alpha, changes[slot], direction);
    }
    if (precondition) precondition(direction);
    if (stored === 0 && !precondition) scale = Math.min(1, 1 / gradientNorm);
    for (let index = 0; index < size; index++) direction[index] *= scale;
    for (let k = stored - 1; k >= 0; k--) {
      const slot = (newest - k + memory) % memory;
      const beta = inverseCurvatures[slot] * dotProduct(changes[slot], direction);
      axpy(alphas[slot] - beta, steps[slot], direction);
    }
    for (let index = 0; index < size; index++) direction[index] = -direction[index];

    let slope = dotProduct(gradient, direction);
    if (!(slope < 0)) {
      // The quasi-Newton model went bad (rounding): restart from the preconditioned gradient.
      stored = 0;
      direction.set(gradient);
      if (precondition) precondition(direction);
      for (let index = 0; index < size; index++) direction[index] = -direction[index];
      slope = dotProduct(gradient, direction);
      if (!(slope < 0)) break;
    }

    let stepLength = 1;
    let candidateValue = value;
    let accepted = false;
    for (let attempt = 0; attempt < MAX_LINE_SEARCH_STEPS; attempt++) {
      for (let index = 0; index < size; index++) {
        candidate[index] = x[index] + stepLength * direction[index];
      }
      candidateValue = valueAndGradient(candidate, candidateGradient);
      evaluations++;
      if (Number.isFinite(candidateValue)) {
        const armijo = candidateValue <= value + ARMIJO_CONSTANT * stepLength * slope;
        const candidateSlope = dotProduct(candidateGradient, direction);
        const approximateWolfe =
          candidateValue <= value + VALUE_ROUNDING_ALLOWANCE * Math.abs(value) &&
          candidateSlope >= WOLFE_SIGMA * slope &&
          candidateSlope <= (2 * WOLFE_DELTA - 1) * slope;
        if (armijo || approximateWolfe) {
          accepted = true;
          break;
        }
        const curvature = candidateValue - value - slope * stepLength;
        const interpolated =
          curvature > 0 ? (-slope * stepLength * stepLength) / (2 * curvature) : stepLength / 2;
        stepLength = Math.min(0.5 * stepLength, Math.max(0.1 * stepLength, interpolated));
      } else {
        stepLength *= 0.1;
      }
    }
    if (!accepted) break;

    // The pair is written to the slot after the newest only once its curvature sᵀy is known to be
    // positive: a rejected pair must not overwrite the oldest pair of a full memory, which the next
    // direction still uses.
    let curvature = 0;
    for (let index = 0; index < size; index++) {
      curvature += (candidate[index] - x[index]) * (candidateGradient[index] - gradient[index]);
    }
    if (curvature > 0) {
      newest = (newest + 1) % memory;
      const step = steps[newest];
      const change = changes[newest];
      for (let index = 0; index < size; index++) {
        step[index] = candidate[index] - x[index];
        change[index] = candidateGradient[index] - gradient[index];
      }
      inverseCurvatures[newest] = 1 / dotProduct(step, change);
      stored = Math.min(stored + 1, memory);
      scale = curvature / preconditionedSquare(change, precondition, direction);
    }

    x.set(candidate);
    gradient.set(candidateGradient);
    value = candidateValue;
    gradientNorm = norm(gradient);
    iterations++;
    onIteration?.(iterations, gradientNorm);
  }

  return {
    x,
    value,
    gradient,
    gradientNorm,
    iterations,
    evaluations,
    converged: gradientNorm <= gradientTolerance,
  };
}

/** yᵀ P y (or yᵀ y without a preconditioner), using `scratch` as workspace. */
function preconditionedSquare(
  change: Float64Array,
  precondition: ((vector: Float64Array) => void) | undefined,
  scratch: Float64Array,
): number {
  scratch.set(change);
  precondition?.(scratch);
  return dotProduct(change, scratch);
}

function dotProduct(a: Float64Array, b: Float64Array): number {
  return dot(a, 0, b, 0, a.length);
}

function axpy(factor: number, source: Float64Array, target: Float64Array): void {
  for (let index = 0; index < target.length; index++) target[index] += factor * source[index];
}
