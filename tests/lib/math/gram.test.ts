import { describe, expect, it } from "vitest";
import {
  accumulateGramUpper,
  accumulateWeightedGramUpper,
  symmetrizeFromUpper,
} from "@/lib/math/gram";
import { matrixFromValues } from "@/lib/math/matrix";
import { runPythonJson } from "../analysis/support/run-python";

/**
 * The kernels' contract: only the upper triangle (j ≤ k) is accumulated, so the lower one is left as
 * it was (zero here) until `symmetrizeFromUpper` copies the upper one onto it.
 */
function expectLowerTriangleZero(values: Float64Array, cols: number) {
  for (let j = 1; j < cols; j++) {
    for (let k = 0; k < j; k++)
      expect({ j, k, value: values[j * cols + k] }).toEqual({ j, k, value: 0 });
  }
}

describe("Gram kernels on odd widths and uneven row ranges", () => {
  it("accumulates Xᵀ X and Xᵀ diag(a) X of rows [3, 14) like NumPy, for 5 and 1 columns", () => {
    // An odd width leaves one column outside the kernel's column pairs, and 11 rows leave three
    // outside its groups of four; rows outside the range must not count.
    for (const cols of [5, 1]) {
      const rows = 16;
      const values = Array.from(
        { length: rows * cols },
        (_, k) => Math.sin(1.7 * k + 0.3) * (1 + (k % 3)),
      );
      const weights = Array.from({ length: rows }, (_, k) => Math.cos(k) - 0.2);
      // Outside reference: NumPy X.T @ X and X.T @ diag(a) @ X of the rows in range.
      const reference = runPythonJson<{ plain: number[]; weighted: number[] }>(
        `import json,sys
import numpy as np
d=json.load(sys.stdin); X=np.array(d["x"]).reshape(-1,d["cols"])[3:14]; a=np.array(d["a"])[3:14]
print(json.dumps({"plain":(X.T@X).ravel().tolist(),"weighted":(X.T@np.diag(a)@X).ravel().tolist()}))`,
        { x: values, cols, a: weights },
      );
      const matrix = matrixFromValues(rows, cols, values);
      const plain = new Float64Array(cols * cols);
      accumulateGramUpper(matrix, 3, 14, plain);
      expectLowerTriangleZero(plain, cols);
      symmetrizeFromUpper(plain, cols);
      const weighted = new Float64Array(cols * cols);
      accumulateWeightedGramUpper(matrix, Float64Array.from(weights), 3, 14, weighted);
      expectLowerTriangleZero(weighted, cols);
      symmetrizeFromUpper(weighted, cols);
      plain.forEach((value, k) => expect(value).toBeCloseTo(reference.plain[k], 13));
      weighted.forEach((value, k) => expect(value).toBeCloseTo(reference.weighted[k], 13));
    }
  });
});
