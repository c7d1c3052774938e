import { describe, expect, it } from "vitest";
import { largestEigenvalueSymmetric } from "@/lib/math/eigen";
import { createMatrix, matrixFromValues } from "@/lib/math/matrix";
import { runPythonJson } from "../analysis/support/run-python";

describe("largestEigenvalueSymmetric", () => {
  it("stops relative to λ_max's size: tiny and huge matrices with close eigenvalues match numpy.linalg.eigvalsh", () => {
    // Eigenvalues 1 and 0.9 (slow power iteration) scaled by 1e-6 and 1e6, rotated off the axes.
    const matrices = [1e-6, 1e6].map((scale) => {
      const [c, s] = [Math.cos(0.3), Math.sin(0.3)];
      const [a, b] = [scale, 0.9 * scale];
      return [a * c * c + b * s * s, (a - b) * c * s, (a - b) * c * s, a * s * s + b * c * c];
    });
    // Outside reference: numpy.linalg.eigvalsh.
    const reference = runPythonJson<number[]>(
      `import json,sys
import numpy as np
print(json.dumps([float(np.linalg.eigvalsh(np.array(m).reshape(2,2))[-1]) for m in json.load(sys.stdin)]))`,
      matrices,
    );
    matrices.forEach((values, index) => {
      const top = largestEigenvalueSymmetric(matrixFromValues(2, 2, values));
      expect(Math.abs(top / reference[index] - 1)).toBeLessThan(1e-10);
    });
  });

  it("after one iteration returns the Rayleigh quotient of its start vector vᵢ = 1 + i/(7n), as NumPy computes it", () => {
    const values = [5, 1, 0, 2, 1, 4, 1, 0, 0, 1, 3, 1, 2, 0, 1, 6];
    // Outside reference: vᵀAv / vᵀv in NumPy for the start vector stated in lib/math/eigen.ts.
    const rayleigh = runPythonJson<number>(
      `import json,sys
import numpy as np
A=np.array(json.load(sys.stdin)).reshape(4,4); v=1+np.arange(4)/(7*4)
print(json.dumps(float(v@A@v/(v@v))))`,
      values,
    );
    const estimate = largestEigenvalueSymmetric(matrixFromValues(4, 4, values), {
      maxIterations: 1,
    });
    expect(estimate).toBeCloseTo(rayleigh, 14);
  });

  it("refuses a matrix that is not square", () => {
    expect(() => largestEigenvalueSymmetric(createMatrix(2, 3))).toThrow(
      "largestEigenvalueSymmetric needs a square matrix",
    );
  });
});
