import { createMatrix, type Matrix } from "../../math/matrix";
import { readTotals } from "../objective-pass";
import { countThreadsForWork } from "../choose-threads";
import { PassPool, type PassResult, type SharedDesign } from "../pass-pool";
import { StoredDesign } from "../stored-design";
import { forEachStoredBlock, isStoredMatrix, type StoredMatrix } from "../stored-matrix";
import type { ClientDesign } from "./client-rows";
import type { EvaluationRequest, EvaluationSums } from "./digest-format";

/** Every row as the fit's subsample: the rows a Hessian over all rows is computed from. */
const ALL_ROWS: NonNullable<EvaluationRequest["sample"]> = { stride: 1, shardStarts: {} };

/**
 * A client's encoded rows shared with a pool of `threads` threads (1: the calling thread only; by
 * default every core when a pass is as much work as the central analysis's threshold): the passes
 * behind its round-2 digest and its answers to the fit's evaluations. Rows in a scratch file are
 * read block by block for each pass (stored-design.ts), the same sums. `close` ends the threads
 * and gives back the scratch file.
 */
export class ClientPasses {
  readonly passes: SharedDesign | StoredDesign;
  private sample: { key: string; passes: SharedDesign } | null = null;
  /** Passes over all rows that round 2 asks for again (see `passAt`), by their point W. */
  private readonly kept = new Map<string, { withSquaredNorms: boolean; result: PassResult }>();

  constructor(
    readonly design: ClientDesign,
    threads?: number,
  ) {
    const weightRows =
      design.labels === null ? 1 : design.labels.reduce((a, b) => Math.max(a, b), 0) + 1;
    const work = design.x.rows * design.x.cols * weightRows;
    const pool = new PassPool(threads ?? countThreadsForWork(work));
    const { x } = design;
    this.passes = isStoredMatrix(x)
      ? new StoredDesign(pool, { ...design, x })
      : pool.share({ ...design, x }, design.shardOffsets);
  }

  /**
   * One evaluation of the coordinator's fit: Σℓᵢ and Σ∇ℓᵢ at W over all rows or over the client's
   * part of the strided subsample, with the subsample's Σ∇²ℓᵢ (softmax, λ excluded) when asked.
   */
  evaluate(request: EvaluationRequest): EvaluationSums {
    const weights = Float64Array.from(request.weights);
    const target = request.sample === null ? this.passes : this.sharedSample(request.sample);
    // The fit starts at W = 0, where round 2's path starts too: that pass is kept for it.
    const { pooled } =
      request.sample === null
        ? this.passAt(
            weights,
            false,
            weights.every((value) => value === 0),
          )
        : target.evaluate(weights, false);
    const sums = readTotals(pooled);
    let hessianSum: number[] | null = null;
    if (request.hessian) {
      // The pass pool's Hessian is a mean over the rows; the coordinator pools sums. A part of a
      // dataset can hold none of the subsample's rows: its sum is zero.
      const size = weights.length;
      // Over all rows of a design in a scratch file, from a copy of them in memory: the fit asks
      // for it only when all rows are few (its subsample is then all of them).
      const hessianTarget = target instanceof StoredDesign ? this.sharedSample(ALL_ROWS) : target;
      hessianSum =
        pooled.rows === 0
          ? new Array<number>(size * size).fill(0)
          : Array.from(
              hessianTarget.computeSoftmaxHessian(weights, 0),
              (value) => value * pooled.rows,
            );
    }
    return {
      rows: pooled.rows,
      lossSum: sums.loss,
      gradientSum: Array.from(sums.gradient),
      hessianSum,
    };
  }

  /**
   * Σℓᵢ, Σ∇ℓᵢ (and with `withSquaredNorms` Σ‖∇ℓᵢ‖²) per shard and pooled over all rows at W. A pass
   * made with `keep` is kept and serves the same point again — one with squared norms also serves
   * one without, their loss and gradient sums being the same arithmetic (objective-pass.ts) — so
   * round 2 makes no pass twice: its path starts at the fit's first point (W = 0) and, for the
   * pooled optimum, ends at the reference point.
   */
  passAt(weights: Float64Array, withSquaredNorms: boolean, keep: boolean): PassResult {
    const key = weights.join(",");
    const known = this.kept.get(key);
    if (known && (known.withSquaredNorms || !withSquaredNorms)) return known.result;
    const result = this.passes.evaluate(weights, withSquaredNorms);
    if (keep) this.kept.set(key, { withSquaredNorms, result });
    return result;
  }

  /** Σ x̃ᵢx̃ᵢᵀ over the client's rows, (d+1) × (d+1). */
  computeGramSum(): number[][] {
    const width = this.design.x.cols;
    const rows = this.design.x.rows;
    const mean = this.passes.computeGram();
    return Array.from({ length: width }, (_, j) =>
      Array.from(mean.subarray(j * width, (j + 1) * width), (value) => value * rows),
    );
  }

  async close(): Promise<void> {
    await this.passes.pool.close();
    if (isStoredMatrix(this.design.x)) this.design.x.file.close();
  }

  /** The client's rows of the fit's subsample (global row g with g mod stride = 0), shared once. */
  private sharedSample(sample: NonNullable<EvaluationRequest["sample"]>): SharedDesign {
    const key = JSON.stringify(sample);
    if (this.sample?.key === key) return this.sample.passes;
    const { design } = this;
    const width = design.x.cols;
    const picked: number[] = [];
    design.shardIds.forEach((id, m) => {
      const globalStart = sample.shardStarts[id] ?? 0;
      for (let row = design.shardOffsets[m]; row < design.shardOffsets[m + 1]; row++) {
        if ((globalStart + row - design.shardOffsets[m]) % sample.stride === 0) picked.push(row);
      }
    });
    const x = createMatrix(picked.length, width, { shared: true });
    const labels = design.labels && new Int32Array(picked.length);
    picked.forEach((row, k) => {
      if (labels && design.labels) labels[k] = design.labels[row];
    });
    copyRows(design.x, picked, x.data);
    const passes = this.passes.pool.share(
      { x, labels, targets: null },
      Int32Array.of(0, picked.length),
    );
    this.sample = { key, passes };
    return passes;
  }
}

/** Rows `picked` (ascending) of a design in memory or in a scratch file, copied into `into`. */
function copyRows(x: Matrix | StoredMatrix, picked: number[], into: Float64Array): void {
  const width = x.cols;
  if (!isStoredMatrix(x)) {
    picked.forEach((row, k) => {
      into.set(x.data.subarray(row * width, (row + 1) * width), k * width);
    });
    return;
  }
  let k = 0;
  forEachStoredBlock(x, (values, firstRow, rowCount) => {
    for (; k < picked.length && picked[k] < firstRow + rowCount; k++) {
      const row = picked[k] - firstRow;
      into.set(values.subarray(row * width, (row + 1) * width), k * width);
    }
  });
}
