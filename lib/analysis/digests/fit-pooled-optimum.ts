import { norm, roundingError } from "../../math/summation";
import { compareCodePoints } from "../code-point-order";
import {
  computeSampleStride,
  fitSoftmax,
  OPTIMUM_RELATIVE_TOLERANCE,
  solveLeastSquares,
} from "../fit-reference-model";
import { finishObjective, type ObjectiveValue } from "../objective";
import type {
  DigestEncoding,
  EvaluationRequest,
  EvaluationSums,
  SchemaDigest,
} from "./digest-format";
import type { PooledFit } from "./merge-gradients";

/** One round of the fit: every client's answer to the request, merged (`mergeEvaluationSums`). */
export type EvaluatePooled = (request: EvaluationRequest) => Promise<EvaluationSums>;

export interface FitPooledOptions {
  lambda: number;
  /** Round 1's digests: the shards and their rows, which place the fit's subsample. */
  schemas: SchemaDigest[];
  /** Least squares only: the merged Σx̃ᵢx̃ᵢᵀ, width × width row-major (one extra round). */
  gram?: Float64Array;
  /** Called after each evaluation round with the rounds so far (progress). */
  onEvaluation?: (evaluations: number) => void;
}

/**
 * The pooled optimum W* of methods.md §2 fitted on the coordinator without a row (methods.md §9),
 * by the central fit's own code (fit-reference-model.ts) with every pass over the rows replaced by a
 * round in which each client returns Σℓᵢ and Σ∇ℓᵢ at the coordinator's W — over all its rows, or
 * over its part of the fit's strided subsample, and once the subsample's Σ∇²ℓᵢ for the
 * preconditioner. Least squares solves the normal equations from the merged Σx̃x̃ᵀ and
 * ∇F(0) = −Σx̃y/N and refines by Newton steps. The same steps as the central fit on the same rows,
 * so the same W* up to the order of summation.
 *
 * The optimizers are synchronous and the rounds are not, so the fit is replayed: it runs until it
 * asks for an evaluation not yet answered, the round is awaited, and the fit runs again from the
 * start with every answer so far. The optimizer is deterministic, so each replay retraces the same
 * steps (a replay costs only the optimizer's own vector arithmetic), and a coordinator that
 * restarts resumes from its stored answers.
 */
export async function fitPooledOptimum(
  encoding: DigestEncoding,
  evaluate: EvaluatePooled,
  options: FitPooledOptions,
): Promise<PooledFit> {
  const answers = new Map<string, EvaluationSums>();
  const hessians = new WeakMap<EvaluationSums, Float64Array>();
  for (;;) {
    try {
      return replayFit(encoding, answers, hessians, options);
    } catch (error) {
      if (!(error instanceof EvaluationNeeded)) throw error;
      answers.set(keyOf(error.request), await evaluate(error.request));
      options.onEvaluation?.(answers.size);
    }
  }
}

/** Adds clients' evaluation sums (compensated, in the order given). */
export function mergeEvaluationSums(parts: EvaluationSums[]): EvaluationSums {
  const size = parts[0]?.gradientSum.length ?? 0;
  const gradient = new CompensatedVector(size);
  const hessian = parts[0]?.hessianSum ? new CompensatedVector(parts[0].hessianSum.length) : null;
  const loss = new CompensatedVector(1);
  let rows = 0;
  for (const part of parts) {
    rows += part.rows;
    loss.add([part.lossSum]);
    gradient.add(part.gradientSum);
    if (hessian && part.hessianSum) hessian.add(part.hessianSum);
  }
  return {
    rows,
    lossSum: loss.values()[0],
    gradientSum: gradient.values(),
    hessianSum: hessian?.values() ?? null,
  };
}

/** Neumaier-compensated running sums of vectors. */
class CompensatedVector {
  private readonly sums: Float64Array;
  private readonly compensation: Float64Array;

  constructor(size: number) {
    this.sums = new Float64Array(size);
    this.compensation = new Float64Array(size);
  }

  add(values: ArrayLike<number>): void {
    for (let k = 0; k < this.sums.length; k++) {
      const total = this.sums[k];
      const value = values[k];
      const next = total + value;
      this.compensation[k] += roundingError(total, value, next);
      this.sums[k] = next;
    }
  }

  values(): number[] {
    return Array.from(this.sums, (value, k) => value + this.compensation[k]);
  }
}

class EvaluationNeeded extends Error {
  constructor(readonly request: EvaluationRequest) {
    super("an evaluation round is needed");
  }
}

function keyOf(request: EvaluationRequest): string {
  return JSON.stringify([request.weights, request.sample?.stride ?? 1, request.hessian]);
}

/**
 * One replay of the fit with the answers so far. `hessians` keeps the preconditioner's Hessian made
 * from each answer, so every replay hands the fit the same array, whose factorization the fit then
 * reuses (fit-reference-model.ts).
 */
function replayFit(
  encoding: DigestEncoding,
  answers: Map<string, EvaluationSums>,
  hessians: WeakMap<EvaluationSums, Float64Array>,
  { lambda, gram, schemas }: FitPooledOptions,
): PooledFit {
  const width = encoding.columns.length + 1;
  const weightRows = encoding.classes === null ? 1 : encoding.classes.length;
  const stride = computeSampleStride(encoding.rows);
  const sample = stride === 1 ? null : { stride, shardStarts: placeShards(schemas) };
  const ask = (weights: Float64Array, sampled: boolean, hessian: boolean): EvaluationSums => {
    const request: EvaluationRequest = {
      encodingHash: encoding.hash,
      weights: Array.from(weights),
      sample: sampled ? sample : null,
      hessian,
    };
    const answer = answers.get(keyOf(request));
    if (answer === undefined) throw new EvaluationNeeded(request);
    return answer;
  };
  const finish = (weights: Float64Array, answer: EvaluationSums): ObjectiveValue =>
    finishObjective(
      { loss: answer.lossSum, gradient: Float64Array.from(answer.gradientSum), squaredNorms: 0 },
      answer.rows,
      weights,
      width,
      lambda,
      false,
    );
  const evaluate = (weights: Float64Array): ObjectiveValue =>
    finish(weights, ask(weights, false, false));
  const start = new Float64Array(weightRows * width);
  const atZero = evaluate(start);
  const tolerance = OPTIMUM_RELATIVE_TOLERANCE * Math.max(1, norm(atZero.gradient));

  if (encoding.classes === null) {
    if (gram === undefined) throw new Error("a least-squares fit needs the merged Gram matrix");
    const normalized = gram.map((value) => value / encoding.rows);
    return solveLeastSquares(width, normalized, lambda, atZero.gradient, tolerance, evaluate);
  }
  return fitSoftmax(
    {
      width,
      sampleIsAllRows: sample === null,
      evaluate,
      evaluateSample: (weights) =>
        sample === null ? evaluate(weights) : finish(weights, ask(weights, true, false)),
      computeSampleHessian: (weights) => {
        const answer = ask(weights, sample !== null, true);
        const known = hessians.get(answer);
        if (known) return known;
        const size = weights.length;
        const hessian = new Float64Array(size * size);
        const sums = answer.hessianSum ?? [];
        for (let k = 0; k < hessian.length; k++) hessian[k] = sums[k] / answer.rows;
        // The regularizer's Hessian λ·I off the biases (methods.md §2), as the central one adds.
        for (let k = 0; k < size; k++) if (k % width !== width - 1) hessian[k * size + k] += lambda;
        hessians.set(answer, hessian);
        return hessian;
      },
    },
    start,
    tolerance,
    lambda,
  );
}

/** Each shard's first row in the pooled, shard-ordered rows (shards in code-point order). */
function placeShards(schemas: SchemaDigest[]): Record<string, number> {
  const shards = schemas
    .flatMap((schema) => schema.shards)
    .sort((a, b) => compareCodePoints(a.id, b.id));
  const starts: Record<string, number> = {};
  let start = 0;
  for (const shard of shards) {
    starts[shard.id] = start;
    start += shard.rows;
  }
  return starts;
}
