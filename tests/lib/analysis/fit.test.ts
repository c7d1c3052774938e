import { describe, expect, it, vi } from "vitest";
import type { Design } from "@/lib/analysis/design";
import {
  centerIntercepts,
  computeSampleStride,
  fitReferenceModel,
  fitSoftmax,
  solveLeastSquares,
  type SoftmaxFitOracle,
} from "@/lib/analysis/fit-reference-model";
import { evaluateObjective } from "@/lib/analysis/objective";
import { PassPool } from "@/lib/analysis/pass-pool";
import {
  assembleSoftmaxHessian,
  classPairAt,
  computeClassProbabilities,
  computeHessianBlock,
  countClassPairs,
} from "@/lib/analysis/softmax-hessian";
import { minimizeLbfgs } from "@/lib/math/lbfgs";
import { matrixFromValues, type Matrix } from "@/lib/math/matrix";
import { designFromText } from "./support/design-from-text";
import { runPythonJson } from "./support/run-python";

/** A small seeded dataset (invented, for checks against outside references only). */
function makeCsv(rows: number, seed: number, { regression = false } = {}): string {
  let state = seed;
  const random = () => {
    state = (state * 1103515245 + 12345) % 2147483648;
    return state / 2147483648;
  };
  const lines = ["a,b,colour,label,shard"];
  for (let i = 0; i < rows; i++) {
    const a = random() * 4 - 2;
    const b = random() * 10;
    const colour = ["red", "green", "blue"][Math.floor(random() * 3)];
    const label = regression
      ? (2 * a - 0.3 * b + random()).toFixed(6)
      : ["x", "y", "z"][a + random() * 2 > 1 ? 0 : b + 3 * random() > 6 ? 1 : 2];
    lines.push([a.toFixed(6), b.toFixed(6), colour, label, `s${i % 3}`].join(","));
  }
  return `${lines.join("\n")}\n`;
}

/** The first `rows` rows of the design, as the softmax Hessian kernels take them. */
function leadingRows(design: Design, rows: number): Matrix {
  const width = design.x.cols;
  return matrixFromValues(rows, width, design.x.data.subarray(0, rows * width));
}

/** ∇²F of rows [0, rows) at W, λ included, from the block kernels (what a pass pool assembles). */
function softmaxHessian(design: Design, rows: number, weights: Float64Array, lambda: number) {
  const x = leadingRows(design, rows);
  const classCount = weights.length / x.cols;
  const probabilities = computeClassProbabilities(x, weights);
  const blocks = Array.from({ length: countClassPairs(classCount) }, (_, pair) => {
    const block = new Float64Array(x.cols * x.cols);
    computeHessianBlock(
      x,
      probabilities,
      classPairAt(pair, classCount),
      new Float64Array(rows),
      block,
    );
    return block;
  });
  return assembleSoftmaxHessian(blocks, classCount, x.cols, lambda);
}

/** Outside reference: F, ∇F and the per-sample-gradient mean square of methods.md §2–§3 in NumPy. */
const OBJECTIVE_PROGRAM = `import json,sys
import numpy as np
from scipy.special import softmax, logsumexp
d=json.load(sys.stdin); width=d["width"]
X=np.array(d["x"]).reshape(-1,width)[d["start"]:d["end"]]; W=np.array(d["w"]).reshape(-1,width); lam=d["lam"]
N=len(X); Wnb=W.copy(); Wnb[:,-1]=0
if d["labels"] is not None:
    y=np.array(d["labels"])[d["start"]:d["end"]]; S=X@W.T; P=softmax(S,axis=1)
    loss=logsumexp(S,axis=1)-S[np.arange(N),y]
    G=np.einsum("ic,ij->icj",P-np.eye(W.shape[0])[y],X).reshape(N,-1)
    H=sum(np.kron(np.diag(p)-np.outer(p,p),np.outer(x,x)) for p,x in zip(P,X))/N
else:
    r=X@W[0]-np.array(d["targets"])[d["start"]:d["end"]]; loss=0.5*r*r; G=r[:,None]*X; H=X.T@X/N
H=H+np.diag((lam*(np.arange(W.size)%width!=width-1)).astype(float))
print(json.dumps({"value":float(loss.mean()+lam/2*(Wnb**2).sum()),"data":G.mean(0).tolist(),
  "gradient":(G.mean(0)+lam*Wnb.ravel()).tolist(),"meanSquare":float((G**2).sum(1).mean()),
  "hessian":H.ravel().tolist()}))`;

interface ObjectiveReference {
  value: number;
  data: number[];
  gradient: number[];
  meanSquare: number;
  hessian: number[];
}

function referenceObjective(
  design: Design,
  weights: Float64Array,
  lambda: number,
  start = 0,
  end = design.x.rows,
): ObjectiveReference {
  return runPythonJson<ObjectiveReference>(OBJECTIVE_PROGRAM, {
    x: Array.from(design.x.data),
    width: design.x.cols,
    w: Array.from(weights),
    lam: lambda,
    labels: design.labels && Array.from(design.labels),
    targets: design.targets && Array.from(design.targets),
    start,
    end,
  });
}

function expectClose(actual: ArrayLike<number>, expected: number[], tolerance: number) {
  expect(actual.length).toBe(expected.length);
  expected.forEach((value, k) =>
    expect(Math.abs(actual[k] - value)).toBeLessThanOrEqual(
      tolerance * Math.max(1, Math.abs(value)),
    ),
  );
}

describe("objective and softmax Hessian (methods.md §2) against NumPy", () => {
  it("gives F, ∇F, the data gradient and the mean squared per-sample norm over a row range", async () => {
    for (const regression of [false, true]) {
      const design = await designFromText(makeCsv(90, 3, { regression }), "label", "shard");
      const weightRows = regression ? 1 : 3;
      const weights = Float64Array.from(
        { length: weightRows * design.x.cols },
        (_, k) => 0.3 * Math.sin(3 * k + 1),
      );
      for (const [start, end] of [
        [0, 90],
        [17, 64],
      ]) {
        const reference = referenceObjective(design, weights, 0.2, start, end);
        const ours = evaluateObjective(design, weights, 0.2, {
          rowStart: start,
          rowEnd: end,
          withSquaredNorms: true,
        });
        expect(ours.rows).toBe(end - start);
        expect(ours.value).toBeCloseTo(reference.value, 13);
        expectClose(ours.gradient, reference.gradient, 1e-13);
        expectClose(ours.dataGradient, reference.data, 1e-13);
        expect(ours.meanSquaredSampleNorm).toBeCloseTo(reference.meanSquare, 12);
      }
      const whole = evaluateObjective(design, weights, 0.2);
      expect(whole.rows).toBe(90);
      expect(whole.meanSquaredSampleNorm).toBeNaN();
    }
  });

  it("assembles the softmax Hessian Σ (diag pᵢ − pᵢpᵢᵀ) ⊗ x̃ᵢx̃ᵢᵀ / n + λ off the biases like NumPy's kron", async () => {
    const design = await designFromText(makeCsv(60, 8), "label", "shard");
    const weights = Float64Array.from({ length: 3 * design.x.cols }, (_, k) => 0.5 * Math.cos(k));
    const reference = referenceObjective(design, weights, 0.05, 0, 40);
    expectClose(softmaxHessian(design, 40, weights, 0.05), reference.hessian, 1e-14);
    // The blocks are the upper triangle of class pairs in row-major order.
    expect(Array.from({ length: 6 }, (_, pair) => classPairAt(pair, 3))).toEqual([
      [0, 0],
      [0, 1],
      [0, 2],
      [1, 1],
      [1, 2],
      [2, 2],
    ]);
  });
});

describe("fitting W* (methods.md §2)", () => {
  it("fits the softmax optimum to the promised tolerance, as NumPy's gradient at it shows", async () => {
    const design = await designFromText(makeCsv(240, 21), "label", "shard");
    const width = design.x.cols;
    const lambda = 0.01;
    const start = new Float64Array(3 * width);
    const tolerance =
      1e-8 * Math.max(1, Math.hypot(...evaluateObjective(design, start, lambda).gradient));
    for (const sampleRows of [80, design.x.rows]) {
      const calls = { all: 0, sample: 0, reported: 0 };
      const oracle: SoftmaxFitOracle = {
        width,
        sampleIsAllRows: sampleRows === design.x.rows,
        evaluate: (weights) => {
          calls.all++;
          return evaluateObjective(design, weights, lambda);
        },
        evaluateSample: (weights) => {
          calls.sample++;
          return evaluateObjective(design, weights, lambda, { rowEnd: sampleRows });
        },
        computeSampleHessian: (weights) => softmaxHessian(design, sampleRows, weights, lambda),
      };
      const fitted = fitSoftmax(oracle, start, tolerance, lambda, () => calls.reported++);
      // Outside reference: F and ∇F at the returned W by NumPy. F is strictly convex, so a gradient
      // within the tolerance pins the optimum (scikit-learn's fit of the same objective is compared
      // end to end in reference-model.test.ts).
      const reference = runPythonJson<{ gradientNorm: number; value: number }>(
        `import json,sys
import numpy as np
from scipy.special import softmax, logsumexp
d=json.load(sys.stdin); width=d["width"]; lam=d["lam"]
X=np.array(d["x"]).reshape(-1,width); y=np.array(d["labels"]); W=np.array(d["w"]).reshape(-1,width); N=len(X)
S=X@W.T; P=softmax(S,axis=1); Wnb=W.copy(); Wnb[:,-1]=0
g=((P-np.eye(3)[y]).T@X)/N+lam*Wnb
print(json.dumps({"gradientNorm":float(np.linalg.norm(g)),
  "value":float((logsumexp(S,axis=1)-S[np.arange(N),y]).mean()+lam/2*(Wnb**2).sum())}))`,
        {
          x: Array.from(design.x.data),
          width,
          lam: lambda,
          labels: Array.from(design.labels ?? []),
          w: Array.from(fitted.weights),
        },
      );
      expect(fitted.converged).toBe(true);
      expect(reference.gradientNorm).toBeLessThanOrEqual(tolerance * 1.0001);
      expect(fitted.gradientNorm).toBeCloseTo(reference.gradientNorm, 12);
      expect(fitted.value).toBeCloseTo(reference.value, 13);
      expect(fitted.tolerance).toBe(tolerance);
      // methods.md §2: the minimum-norm optimum, class intercepts summing to zero.
      const intercepts = [0, 1, 2].map((c) => fitted.weights[c * width + width - 1]);
      expect(Math.abs(intercepts[0] + intercepts[1] + intercepts[2])).toBeLessThan(1e-15);
      // Counted as documented: full-data evaluations including the one at zero, and the sample's
      // iterations and evaluations only when the sample is all rows.
      const sampleIsAll = oracle.sampleIsAllRows;
      expect(fitted.evaluations).toBe(1 + calls.all + (sampleIsAll ? calls.sample : 0));
      if (sampleIsAll) expect(fitted.iterations).toBeGreaterThan(calls.reported);
      else expect(fitted.iterations).toBe(calls.reported);
      expect(calls.reported).toBeGreaterThan(0);
    }
  });

  it("takes one Newton step on a quadratic whose Hessian the sample gives exactly, also when the fit is replayed", () => {
    // F(W) = ½ (W − W°)ᵀ A (W − W°) with A symmetric positive definite, 2 classes × width 3. The
    // oracle's sample Hessian is A without λ on the biases (the regularizer leaves them out, §2);
    // the preconditioner adds λ there, so it is A (up to the 1e-10 floor) and preconditioned
    // L-BFGS's first direction −A⁻¹∇F is Newton's step, which lands on a quadratic's minimum
    // (standard: Nocedal & Wright, ch. 3, from memory). Any other curvature model needs more steps.
    const width = 3;
    const size = 2 * width;
    const lambda = 0.5;
    const spread = Array.from({ length: size }, (_, i) =>
      Array.from({ length: size }, (_, j) => Math.sin(3 * i + 7 * j + 1)),
    );
    const curvature = Float64Array.from({ length: size * size }, (_, k) => {
      const [i, j] = [Math.floor(k / size), k % size];
      const gram = spread.reduce((sum, row) => sum + row[i] * row[j], 0);
      return gram + (i === j ? 1 : 0);
    });
    const optimum = Float64Array.from({ length: size }, (_, k) => k - 2.5);
    const evaluate = (weights: Float64Array) => {
      const offset = weights.map((value, k) => value - optimum[k]);
      const gradient = Float64Array.from({ length: size }, (_, i) =>
        offset.reduce((sum, value, j) => sum + curvature[i * size + j] * value, 0),
      );
      const value = 0.5 * offset.reduce((sum, v, k) => sum + v * gradient[k], 0);
      return { value, gradient } as ReturnType<SoftmaxFitOracle["evaluate"]>;
    };
    // One array handed over on every call, as the fit from digests does when it replays the fit.
    const sampleHessian = Float64Array.from(curvature, (value, k) =>
      Math.floor(k / size) === k % size && (k % size) % width === width - 1
        ? value - lambda
        : value,
    );
    const oracle: SoftmaxFitOracle = {
      width,
      sampleIsAllRows: false,
      evaluate,
      evaluateSample: evaluate,
      computeSampleHessian: () => sampleHessian,
    };
    const start = new Float64Array(size);
    const tolerance = 1e-8 * Math.hypot(...evaluate(start).gradient);
    const first = fitSoftmax(oracle, start, tolerance, lambda);
    const replayed = fitSoftmax(oracle, start, tolerance, lambda);
    for (const fitted of [first, replayed]) {
      expect(fitted.converged).toBe(true);
      expect(fitted.iterations).toBe(1);
      // Counted as documented: the one at zero, the start from the rough point and one step.
      expect(fitted.evaluations).toBe(3);
    }
    expect(replayed.weights).toEqual(first.weights);
    // The intercepts (the last column) are re-centred: the minimum-norm representative.
    expect(first.weights[width - 1] + first.weights[2 * width - 1]).toBeCloseTo(0, 14);
  });

  it("solves least squares like numpy.linalg.solve, refining an inexact system by Newton steps", async () => {
    const design = await designFromText(makeCsv(120, 5, { regression: true }), "label", "shard");
    const width = design.x.cols;
    const lambda = 0.1;
    const reference = runPythonJson<{ gram: number[]; solution: number[] }>(
      `import json,sys
import numpy as np
d=json.load(sys.stdin); width=d["width"]; lam=d["lam"]
X=np.array(d["x"]).reshape(-1,width); y=np.array(d["y"]); N=len(X); G=X.T@X/N
L=np.diag([lam]*(width-1)+[0.0])
print(json.dumps({"gram":G.ravel().tolist(),"solution":np.linalg.solve(G+L,X.T@y/N).tolist()}))`,
      { x: Array.from(design.x.data), width, lam: lambda, y: Array.from(design.targets ?? []) },
    );
    const zero = evaluateObjective(design, new Float64Array(width), lambda);
    const tolerance = 1e-8 * Math.max(1, Math.hypot(...zero.gradient));
    // An exact G: solved at once; a G off by 1% on its diagonal: Newton steps on the true gradient
    // converge to the true solution.
    for (const [perturbation, expectedCalls] of [
      [0, 1],
      [0.01, null],
    ] as const) {
      const gram = Float64Array.from(reference.gram, (value, k) =>
        k % (width + 1) === 0 ? value * (1 + perturbation) : value,
      );
      let calls = 0;
      const solved = solveLeastSquares(width, gram, lambda, zero.gradient, tolerance, (weights) => {
        calls++;
        return evaluateObjective(design, weights, lambda);
      });
      expectClose(solved.weights, reference.solution, 1e-9);
      expect(solved.converged).toBe(true);
      expect(solved.gradientNorm).toBeLessThanOrEqual(tolerance);
      expect(solved.value).toBe(evaluateObjective(design, solved.weights, lambda).value);
      expect(solved.iterations).toBe(0);
      expect(solved.evaluations).toBe(1 + calls);
      if (expectedCalls !== null) expect(calls).toBe(expectedCalls);
      else expect(calls).toBeGreaterThan(1);
    }
    // A G off by half on its diagonal: five Newton steps (the most it takes) each cut the error
    // by about a third only, so the solve stops short and says so.
    const farOff = Float64Array.from(reference.gram, (value, k) =>
      k % (width + 1) === 0 ? value * 1.5 : value,
    );
    let calls = 0;
    const stopped = solveLeastSquares(
      width,
      farOff,
      lambda,
      zero.gradient,
      tolerance,
      (weights) => {
        calls++;
        return evaluateObjective(design, weights, lambda);
      },
    );
    expect(calls).toBe(6);
    expect(stopped.evaluations).toBe(7);
    expect(stopped.converged).toBe(false);
    expect(stopped.gradientNorm).toBeGreaterThan(tolerance);
  });

  it("re-centres class intercepts without changing F (softmax is invariant to a common shift)", async () => {
    const design = await designFromText(makeCsv(50, 2), "label", "shard");
    const width = design.x.cols;
    const weights = Float64Array.from({ length: 3 * width }, (_, k) => Math.sin(k) + (k % width));
    const before = evaluateObjective(design, weights, 0.1).value;
    const intercepts = [0, 1, 2].map((c) => weights[c * width + width - 1]);
    const mean = (intercepts[0] + intercepts[1] + intercepts[2]) / 3;
    centerIntercepts(weights, width, 3);
    [0, 1, 2].forEach((c) =>
      expect(weights[c * width + width - 1]).toBeCloseTo(intercepts[c] - mean, 14),
    );
    expect(weights[0]).toBe(Math.sin(0));
    expect(evaluateObjective(design, weights, 0.1).value).toBeCloseTo(before, 13);
  });

  it("subsamples every k-th row so that about 20 000 rows remain (methods.md §2's rough solve)", () => {
    expect(computeSampleStride(1)).toBe(1);
    expect(computeSampleStride(39_999)).toBe(1);
    expect(computeSampleStride(40_000)).toBe(2);
    expect(computeSampleStride(1_000_000)).toBe(50);
  });

  it("fits through a pass pool: softmax on all rows and on a strided subsample, least squares, to NumPy's gradient", async () => {
    // A pool of one thread runs every pass on the calling thread.
    const pool = new PassPool(1);
    try {
      for (const [rows, regression] of [
        [300, false],
        [40_010, false],
        [300, true],
      ] as const) {
        const design = await designFromText(makeCsv(rows, 31, { regression }), "label", "shard");
        const passes = pool.share(design, design.shardOffsets);
        const passesOverAllRows = vi.spyOn(passes, "evaluate");
        const sharedWithPool = vi.spyOn(pool, "share");
        sharedWithPool.mockClear();
        const progress: number[] = [];
        const lambda = 0.02;
        const fitted = fitReferenceModel(design, passes, passes.computeGram(), lambda, (fraction) =>
          progress.push(fraction),
        );
        // `evaluations` counts every pass over all rows, the one at zero and (when the sample is
        // all rows) the rough solve's included.
        expect(fitted.evaluations).toBe(passesOverAllRows.mock.calls.length);
        // Outside reference: ‖∇F‖ at zero and at the returned W* by NumPy (methods.md §2's stopping rule).
        const reference = runPythonJson<{ atZero: number; atOptimum: number }>(
          `import json,sys
import numpy as np
from scipy.special import softmax
d=json.load(sys.stdin); width=d["width"]; lam=d["lam"]
X=np.array(d["x"]).reshape(-1,width); W=np.array(d["w"]).reshape(-1,width); N=len(X)
def grad(W):
    Wnb=W.copy(); Wnb[:,-1]=0
    if d["labels"] is not None:
        R=softmax(X@W.T,axis=1)-np.eye(len(W))[np.array(d["labels"])]
    else:
        R=(X@W[0]-np.array(d["targets"]))[:,None]
    return (R.T@X)/N+lam*Wnb
print(json.dumps({"atZero":float(np.linalg.norm(grad(np.zeros_like(W)))),"atOptimum":float(np.linalg.norm(grad(W)))}))`,
          {
            x: Array.from(design.x.data),
            width: design.x.cols,
            lam: lambda,
            w: Array.from(fitted.weights),
            labels: design.labels && Array.from(design.labels),
            targets: design.targets && Array.from(design.targets),
          },
        );
        const tolerance = 1e-8 * Math.max(1, reference.atZero);
        expect(fitted.tolerance).toBeCloseTo(tolerance, 20);
        expect(fitted.converged).toBe(true);
        expect(reference.atOptimum).toBeLessThanOrEqual(tolerance * 1.0001);
        expect(fitted.atZero.pooled.rows).toBe(rows);
        expect(fitted.atZero.shards.map((shard) => shard.rows)).toEqual(
          design.shardIds.map((_, m) => design.shardOffsets[m + 1] - design.shardOffsets[m]),
        );
        if (regression) {
          expect(fitted.iterations).toBe(0);
        } else {
          // Without a progress callback the fit is the same.
          if (rows < 40_000) {
            const quiet = fitReferenceModel(design, passes, passes.computeGram(), lambda);
            expect(quiet.weights).toEqual(fitted.weights);
          }
          // The progress bar moves within [0, 1] and ends full once the tolerance is met.
          expect(progress.length).toBeGreaterThan(0);
          expect(progress.every((fraction) => fraction >= 0 && fraction <= 1)).toBe(true);
          expect(progress.at(-1)).toBe(1);
          expect(progress[0]).toBeLessThan(1);
        }
        if (rows > 40_000) {
          // The rough solve's sample: every 2nd row (stride ⌊40 010 / 20 000⌋), in shared memory
          // for the pool's threads, as one chunk.
          expect(sharedWithPool).toHaveBeenCalledTimes(1);
          const [sample, sampleOffsets] = sharedWithPool.mock.calls[0];
          const width = design.x.cols;
          expect(sample.x.rows).toBe(20_005);
          expect(sample.x.data.buffer).toBeInstanceOf(SharedArrayBuffer);
          expect(Array.from(sampleOffsets)).toEqual([0, 20_005]);
          expect(sample.targets).toBeNull();
          for (let k = 0; k < 20_005; k++) {
            expect(sample.labels?.[k]).toBe(design.labels?.[2 * k]);
            for (let j = 0; j < width; j++) {
              if (sample.x.data[k * width + j] !== design.x.data[2 * k * width + j]) {
                expect.fail(`sample row ${k} differs from design row ${2 * k} at column ${j}`);
              }
            }
          }
          // The progress bar moves on a log scale from ‖∇F(0)‖ to the tolerance, so it passes
          // through the middle.
          expect(progress.some((fraction) => fraction > 0.1 && fraction < 0.9)).toBe(true);
          // The subsampled Newton start pays for itself: fitReferenceModel's comment promises
          // about a third of plain L-BFGS's full passes; here at most 60% of them (plain L-BFGS
          // from zero on the same objective and tolerance, counted the same way).
          const plain = minimizeLbfgs(
            (weights, gradient) => {
              const evaluation = evaluateObjective(design, weights, lambda);
              gradient.set(evaluation.gradient);
              return evaluation.value;
            },
            new Float64Array(fitted.weights.length),
            { gradientTolerance: fitted.tolerance, maxIterations: 5000 },
          );
          expect(plain.converged).toBe(true);
          expect(fitted.evaluations).toBeLessThan(0.6 * (plain.evaluations + 1));
        }
      }
    } finally {
      await pool.close();
    }
  });
});
