import { describe, expect, it } from "vitest";
import {
  accumulatePass,
  createTotals,
  createWorkspace,
  mergeTotals,
  readTotals,
  type PassCentres,
  type PassData,
  type PassTotals,
} from "@/lib/analysis/objective-pass";
import { matrixFromValues } from "@/lib/math/matrix";
import { runPythonJson } from "./support/run-python";

/** A seeded generator (invented data, for checks against outside references only). */
function seeded(seed: number) {
  let state = seed;
  return () => {
    state = (state * 1103515245 + 12345) % 2147483648;
    return state / 2147483648;
  };
}

/** Rows of features and a bias column, labels for `classes` classes (0 = least squares). */
function makeData(rows: number, width: number, classes: number, seed: number): PassData {
  const random = seeded(seed);
  const x = Float64Array.from({ length: rows * width }, (_, k) =>
    k % width === width - 1 ? 1 : 4 * random() - 2,
  );
  return {
    x: matrixFromValues(rows, width, x),
    labels:
      classes > 0 ? Int32Array.from({ length: rows }, () => Math.floor(random() * classes)) : null,
    targets: classes > 0 ? null : Float64Array.from({ length: rows }, () => 6 * random() - 3),
  };
}

/**
 * Outside reference: methods.md §2–§3's per-row losses and gradients in NumPy/SciPy, summed over a
 * row range: Σ ℓᵢ, Σ ∇ℓᵢ, Σ ‖∇ℓᵢ‖², Σ ‖∇ℓᵢ − c_shard‖², Σ ‖∇ℓᵢ − c_pooled‖².
 */
const SUMS_PROGRAM = `import json, sys
import numpy as np
from scipy.special import softmax, logsumexp
out = []
for d in json.load(sys.stdin):
    width = d["width"]; X = np.array(d["x"]).reshape(-1, width)[d["start"]:d["end"]]
    W = np.array(d["w"]).reshape(-1, width)
    if d["labels"] is not None:
        y = np.array(d["labels"])[d["start"]:d["end"]]; S = X @ W.T
        loss = logsumexp(S, axis=1) - S[np.arange(len(X)), y]
        R = softmax(S, axis=1) - np.eye(len(W))[y]
    else:
        R = (X @ W[0] - np.array(d["targets"])[d["start"]:d["end"]])[:, None]; loss = 0.5 * R[:, 0] ** 2
    G = np.einsum("ic,ij->icj", R, X).reshape(len(X), R.shape[1] * width)
    cs, cp = np.array(d["shard"]), np.array(d["pooled"])
    out.append({"loss": float(loss.sum()), "gradient": G.sum(0).tolist(),
        "norms": float((G ** 2).sum()), "shard": float(((G - cs) ** 2).sum()),
        "pooled": float(((G - cp) ** 2).sum())})
print(json.dumps(out))`;

interface Sums {
  loss: number;
  gradient: number[];
  norms: number;
  shard: number;
  pooled: number;
}

function expectNear(actual: number, expected: number) {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(1e-12 * Math.max(1, Math.abs(expected)));
}

describe("one pass's sums (methods.md §2–§3) against NumPy and SciPy", () => {
  // Softmax with an even and an odd number of classes (the kernel pairs classes), least squares;
  // ranges over several 256-row blocks and with 4-row groups cut at both ends.
  const cases = [
    { classes: 2, rows: 530 },
    { classes: 3, rows: 530 },
    { classes: 4, rows: 61 },
    { classes: 5, rows: 61 },
    { classes: 0, rows: 530 },
  ];
  const ranges = (rows: number): [number, number][] => [
    [0, rows],
    [1, rows - 2],
    [5, 8],
    [7, 7],
  ];

  it("sums losses, gradients and squared gradient norms, plain and about centres", () => {
    const requests: unknown[] = [];
    const runs: {
      data: PassData;
      weights: Float64Array;
      range: [number, number];
      centres: PassCentres;
    }[] = [];
    for (const [index, { classes, rows }] of cases.entries()) {
      const width = 4;
      const data = makeData(rows, width, classes, 11 + index);
      const size = Math.max(1, classes) * width;
      const weights = Float64Array.from(
        { length: size },
        (_, k) => 0.4 * Math.sin(2.3 * k + index),
      );
      const centres = {
        shard: Float64Array.from({ length: size }, (_, k) => 0.1 * Math.cos(k)),
        pooled: Float64Array.from({ length: size }, (_, k) => 0.05 * k - 0.2),
      };
      for (const range of ranges(rows)) {
        runs.push({ data, weights, range, centres });
        requests.push({
          x: Array.from(data.x.data),
          width,
          w: Array.from(weights),
          labels: data.labels && Array.from(data.labels),
          targets: data.targets && Array.from(data.targets),
          start: range[0],
          end: range[1],
          shard: Array.from(centres.shard),
          pooled: Array.from(centres.pooled),
        });
      }
    }
    const reference = runPythonJson<Sums[]>(SUMS_PROGRAM, requests);
    runs.forEach(({ data, weights, range: [start, end], centres }, k) => {
      const classCount = data.labels ? weights.length / data.x.cols : 1;
      const workspace = createWorkspace(classCount, data.x.cols);
      const plain = createTotals(weights.length);
      accumulatePass(data, weights, start, end, plain, workspace, false);
      const norms = createTotals(weights.length);
      accumulatePass(data, weights, start, end, norms, workspace, true);
      const centred = createTotals(weights.length);
      accumulatePass(data, weights, start, end, centred, workspace, true, centres);
      const expected = reference[k];
      for (const totals of [plain, norms, centred]) {
        const read = readTotals(totals);
        expect(totals.rows).toBe(end - start);
        expectNear(read.loss, expected.loss);
        expect(read.gradient).toHaveLength(expected.gradient.length);
        expected.gradient.forEach((value, j) => expectNear(read.gradient[j], value));
      }
      expect(readTotals(plain).squaredNorms).toBe(0);
      expect(readTotals(plain).pooledSquaredDeviations).toBe(0);
      expectNear(readTotals(norms).squaredNorms, expected.norms);
      expect(readTotals(norms).pooledSquaredDeviations).toBe(0);
      expectNear(readTotals(centred).squaredNorms, expected.shard);
      expectNear(readTotals(centred).pooledSquaredDeviations, expected.pooled);
    });
  });

  it("merges totals of parts into the totals of the whole (they are plain sums)", () => {
    const data = makeData(700, 5, 3, 99);
    const weights = Float64Array.from({ length: 15 }, (_, k) => 0.3 * Math.cos(k));
    const centres = {
      shard: new Float64Array(15).fill(0.01),
      pooled: new Float64Array(15).fill(-0.02),
    };
    const whole = createTotals(15);
    accumulatePass(data, weights, 0, 700, whole, createWorkspace(3, 5), true, centres);
    const merged = createTotals(15);
    for (const [start, end] of [
      [0, 123],
      [123, 500],
      [500, 700],
    ]) {
      const part = createTotals(15);
      accumulatePass(data, weights, start, end, part, createWorkspace(3, 5), true, centres);
      mergeTotals(merged, part);
    }
    expect(merged.rows).toBe(700);
    const [a, b] = [readTotals(merged), readTotals(whole)];
    expectNear(a.loss, b.loss);
    expectNear(a.squaredNorms, b.squaredNorms);
    expectNear(a.pooledSquaredDeviations, b.pooledSquaredDeviations);
    b.gradient.forEach((value, j) => expectNear(a.gradient[j], value));
  });

  it("carries every sum's rounding error, as math.fsum's exact sum shows", () => {
    // Sums whose plain double sum loses the small terms entirely: 1e16 + 1 + 1 − 1e16 is 0 in
    // doubles, 2 exactly. Each source's compensation term must be carried over too.
    const values = [1e16, 1, 1, -1e16, 0.5];
    const exact = runPythonJson<number>(
      `import sys, json, math
print(json.dumps(math.fsum(json.load(sys.stdin))))`,
      values,
    );
    expect(exact).toBe(2.5);
    const totals = createTotals(2);
    for (const value of values) {
      const source: PassTotals = {
        ...createTotals(2),
        rows: 1,
        lossSum: value,
        squaredGradientNormSum: value,
        pooledSquaredDeviationSum: value,
        gradientSum: Float64Array.of(value, -value),
      };
      mergeTotals(totals, source);
    }
    // A source's own compensation is carried over as well: 0.25 + 0.125.
    mergeTotals(totals, {
      ...createTotals(2),
      lossSum: 0.25,
      lossCompensation: 0.125,
      squaredGradientNormSum: 0.25,
      squaredGradientNormCompensation: 0.125,
      pooledSquaredDeviationSum: 0.25,
      pooledSquaredDeviationCompensation: 0.125,
      gradientSum: Float64Array.of(0.25, -0.25),
      gradientCompensation: Float64Array.of(0.125, -0.125),
    });
    const read = readTotals(totals);
    expect(totals.rows).toBe(5);
    expect(read.loss).toBe(exact + 0.375);
    expect(read.squaredNorms).toBe(exact + 0.375);
    expect(read.pooledSquaredDeviations).toBe(exact + 0.375);
    expect(Array.from(read.gradient)).toEqual([exact + 0.375, -exact - 0.375]);
  });
});
