import { describe, expect, it } from "vitest";
import { choleskyDecompose, choleskySolveInPlace } from "@/lib/math/cholesky";
import { largestEigenvalueSymmetric } from "@/lib/math/eigen";
import {
  accumulateGramUpper,
  accumulateWeightedGramUpper,
  symmetrizeFromUpper,
} from "@/lib/math/gram";
import { createMatrix, matrixFromValues } from "@/lib/math/matrix";
import { measureColumnMoments, measureMoments } from "@/lib/math/moments";
import { maximizeOnInterval } from "@/lib/math/scalar-search";
import { softmaxInPlace } from "@/lib/math/softmax";
import { runPythonJson } from "../analysis/support/run-python";

function seededValues(count: number, seed: number): Float64Array {
  const values = new Float64Array(count);
  let state = seed;
  for (let index = 0; index < count; index++) {
    state = (state * 1103515245 + 12345) % 2147483648;
    values[index] = state / 2147483648 - 0.5;
  }
  return values;
}

describe("softmaxInPlace", () => {
  it("matches SciPy's softmax and logsumexp", () => {
    const inputs = [
      [1, 2, 3],
      [1000, 1001, 999],
      [-1e4, 0, 5],
    ];
    // Outside reference: scipy.special.softmax / logsumexp.
    const reference = runPythonJson<{ p: number[][]; lse: number[] }>(
      `import json,sys
from scipy.special import softmax, logsumexp
z=json.load(sys.stdin)
print(json.dumps({"p":[list(softmax(r)) for r in z],"lse":[float(logsumexp(r)) for r in z]}))`,
      inputs,
    );
    inputs.forEach((row, index) => {
      const values = Float64Array.from(row);
      const lse = softmaxInPlace(values, 0, values.length);
      expect(lse).toBeCloseTo(reference.lse[index], 12);
      values.forEach((value, c) => expect(value).toBeCloseTo(reference.p[index][c], 15));
    });
  });

  it("works on a slice and never overflows (huge logits)", () => {
    // e^1000 overflows a double, so an unshifted softmax gives NaN here. Identity:
    // log(e^a + e^(a−1)) = a + log(1 + e^−1), and p = logistic(1) = 1/(1 + e^−1).
    const values = Float64Array.of(7, 1000, 999, 7);
    const lse = softmaxInPlace(values, 1, 2);
    expect(values[0]).toBe(7);
    expect(values[3]).toBe(7);
    expect(lse).toBeCloseTo(1000 + Math.log1p(Math.exp(-1)), 12);
    expect(values[1]).toBeCloseTo(1 / (1 + Math.exp(-1)), 15);
    expect(values[2]).toBeCloseTo(1 / (1 + Math.E), 15);
    // At the top of the range: equal logits near the largest double share evenly, and the result
    // stays finite (a + ln 2 rounds to a there).
    const huge = Float64Array.of(1e308, 1e308);
    expect(Number.isFinite(softmaxInPlace(huge, 0, 2))).toBe(true);
    expect(Array.from(huge)).toEqual([0.5, 0.5]);
  });
});

describe("Cholesky, Gram and eigenvalue kernels", () => {
  const rows = 40;
  const cols = 6;
  const x = matrixFromValues(rows, cols, seededValues(rows * cols, 7));

  it("accumulates XᵀX like NumPy and solves (XᵀX + I) v = b like numpy.linalg.solve", () => {
    const gram = new Float64Array(cols * cols);
    accumulateGramUpper(x, 0, 17, gram);
    accumulateGramUpper(x, 17, rows, gram);
    symmetrizeFromUpper(gram, cols);
    const rhs = Array.from({ length: cols }, (_, index) => index + 1);
    // Outside reference: NumPy X.T @ X, numpy.linalg.solve, numpy.linalg.eigvalsh.
    const reference = runPythonJson<{ gram: number[]; solution: number[]; top: number }>(
      `import json,sys
import numpy as np
d=json.load(sys.stdin)
X=np.array(d["x"]).reshape(${rows},${cols}); G=X.T@X
A=G+np.eye(${cols})
print(json.dumps({"gram":G.ravel().tolist(),"solution":np.linalg.solve(A,np.array(d["b"],float)).tolist(),"top":float(np.linalg.eigvalsh(G)[-1])}))`,
      { x: Array.from(x.data), b: rhs },
    );
    gram.forEach((value, index) => expect(value).toBeCloseTo(reference.gram[index], 12));

    const shifted = matrixFromValues(cols, cols, Float64Array.from(gram));
    for (let index = 0; index < cols; index++) shifted.data[index * cols + index] += 1;
    const lower = createMatrix(cols, cols);
    choleskyDecompose(shifted, lower);
    const solution = Float64Array.from(rhs);
    choleskySolveInPlace(lower, solution);
    solution.forEach((value, index) => expect(value).toBeCloseTo(reference.solution[index], 10));

    const top = largestEigenvalueSymmetric(matrixFromValues(cols, cols, gram));
    expect(Math.abs(top - reference.top) / reference.top).toBeLessThan(1e-10);
  });

  it("accumulates Xᵀ diag(a) X like NumPy, and the doc example by hand", () => {
    const weights = seededValues(rows, 19);
    const weighted = new Float64Array(cols * cols);
    accumulateWeightedGramUpper(x, weights, 0, 9, weighted);
    accumulateWeightedGramUpper(x, weights, 9, rows, weighted);
    symmetrizeFromUpper(weighted, cols);
    // Outside reference: NumPy X.T @ diag(a) @ X.
    const reference = runPythonJson<number[]>(
      `import json,sys
import numpy as np
d=json.load(sys.stdin)
X=np.array(d["x"]).reshape(${rows},${cols})
print(json.dumps((X.T@np.diag(d["a"])@X).ravel().tolist()))`,
      { x: Array.from(x.data), a: Array.from(weights) },
    );
    weighted.forEach((value, index) => expect(value).toBeCloseTo(reference[index], 13));

    const example = new Float64Array(4);
    accumulateWeightedGramUpper(
      matrixFromValues(2, 2, [1, 2, 3, 4]),
      Float64Array.of(2, -1),
      0,
      2,
      example,
    );
    expect(Array.from(example)).toEqual([-7, -8, 0, -8]);
  });

  it("gives the textbook factor of [[4, 2], [2, 3]] (hand-computed)", () => {
    const lower = createMatrix(2, 2);
    choleskyDecompose(matrixFromValues(2, 2, [4, 2, 2, 3]), lower);
    expect(Array.from(lower.data)).toEqual([2, 0, 1, Math.SQRT2]);
  });

  it("rejects a matrix that is not positive definite", () => {
    expect(() =>
      choleskyDecompose(matrixFromValues(2, 2, [1, 2, 2, 1]), createMatrix(2, 2)),
    ).toThrow(RangeError);
  });

  it("finds λ_max of [[2, 1], [1, 2]] = 3 and of the zero matrix = 0 (hand-computed)", () => {
    expect(largestEigenvalueSymmetric(matrixFromValues(2, 2, [2, 1, 1, 2]))).toBeCloseTo(3, 12);
    expect(largestEigenvalueSymmetric(createMatrix(3, 3))).toBe(0);
  });
});

describe("measureMoments", () => {
  it("matches NumPy's mean and std, whole or column by column of a table, and the doc example", () => {
    const rows = 5000;
    const table = seededValues(rows * 3, 23).map((value, k) =>
      k % 3 === 1 ? 1e6 + 3 * value : value,
    );
    // Outside reference: numpy.mean and numpy.std (population, ddof = 0) of each column.
    const reference = runPythonJson<{ mean: number[]; std: number[] }>(
      `import json,sys
import numpy as np
x=np.array(json.load(sys.stdin)).reshape(${rows},3)
print(json.dumps({"mean":x.mean(0).tolist(),"std":x.std(0).tolist()}))`,
      Array.from(table),
    );
    const columns = measureColumnMoments(table, rows, 3, [1, 2]);
    const middle = Float64Array.from({ length: rows }, (_, row) => table[row * 3 + 1]);
    [measureMoments(middle), columns[0]].forEach((moments) => {
      // NumPy sums pairwise, these in compensated blocks: both to a few ε relative.
      expect(Math.abs(moments.mean - reference.mean[1]) / reference.mean[1]).toBeLessThan(1e-14);
      expect(Math.abs(moments.std - reference.std[1]) / reference.std[1]).toBeLessThan(1e-10);
    });
    expect(columns[0]).toEqual(measureMoments(middle));
    expect(columns[1].mean).toBeCloseTo(reference.mean[2], 14);
    expect(Math.abs(columns[1].std - reference.std[2]) / reference.std[2]).toBeLessThan(1e-12);
    expect(measureMoments(Float64Array.of(2, 4, 4, 4, 5, 5, 7, 9))).toEqual({ mean: 5, std: 2 });
    expect(measureColumnMoments(Float64Array.of(2, 5, 4, 5, 4, 7, 4, 9), 4, 2, [0, 1])).toEqual([
      { mean: 3.5, std: 0.8660254037844386 },
      { mean: 6.5, std: 1.6583123951777 },
    ]);
  });
});

describe("maximizeOnInterval", () => {
  it("finds the top of a concave function to the tolerance (hand-computed maximum at 2)", () => {
    const result = maximizeOnInterval((x) => -((x - 2) ** 2), 0, 5, { tolerance: 1e-9 });
    expect(Math.abs(result.argument - 2)).toBeLessThan(1e-8);
  });

  it("returns the end of the interval for a monotone function", () => {
    const result = maximizeOnInterval((x) => x, -3, 4);
    expect(result.argument).toBeGreaterThan(4 - 1e-8);
  });
});
