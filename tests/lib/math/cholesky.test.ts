import { describe, expect, it } from "vitest";
import { choleskyDecompose, choleskySolveInPlace } from "@/lib/math/cholesky";
import { createMatrix, matrixFromValues } from "@/lib/math/matrix";
import { runPythonJson } from "../analysis/support/run-python";

const A = [4, 2, 0.4, 2, 5, 1, 0.4, 1, 3];

describe("Cholesky factor and solve", () => {
  it("overwrites whatever `lower` held, like numpy.linalg.cholesky, and solves a slice of a longer array like numpy.linalg.solve", () => {
    // Outside reference: numpy.linalg.cholesky and numpy.linalg.solve.
    const reference = runPythonJson<{ lower: number[]; solution: number[] }>(
      `import json,sys
import numpy as np
A=np.array(json.load(sys.stdin)).reshape(3,3)
print(json.dumps({"lower":np.linalg.cholesky(A).ravel().tolist(),"solution":np.linalg.solve(A,[1.0,-2.0,3.0]).tolist()}))`,
      A,
    );
    // A reused factor holds the previous matrix's numbers, upper triangle included.
    const lower = matrixFromValues(3, 3, new Float64Array(9).fill(7));
    choleskyDecompose(matrixFromValues(3, 3, A), lower);
    lower.data.forEach((value, k) => expect(value).toBeCloseTo(reference.lower[k], 15));

    // The right-hand side sits at offset 2 of a longer array; its neighbours must stay as they are.
    const values = Float64Array.of(-9, -9, 1, -2, 3, -9);
    choleskySolveInPlace(lower, values, 2);
    expect([values[0], values[1], values[5]]).toEqual([-9, -9, -9]);
    reference.solution.forEach((value, k) => expect(values[2 + k]).toBeCloseTo(value, 14));
  });

  it("refuses a singular matrix (a zero pivot) as numpy.linalg.cholesky does, naming the pivot", () => {
    const singular = [1, 1, 1, 1];
    // Outside reference: numpy.linalg.cholesky raises LinAlgError on it.
    const numpyRefuses = runPythonJson<boolean>(
      `import json,sys
import numpy as np
try:
    np.linalg.cholesky(np.array(json.load(sys.stdin),float).reshape(2,2)); print("false")
except np.linalg.LinAlgError:
    print("true")`,
      singular,
    );
    expect(numpyRefuses).toBe(true);
    expect(() => choleskyDecompose(matrixFromValues(2, 2, singular), createMatrix(2, 2))).toThrow(
      "matrix is not positive definite (pivot 1 is 0)",
    );
  });

  it("refuses shapes that do not match, naming them", () => {
    const square = matrixFromValues(2, 2, [4, 2, 2, 3]);
    const message = /Cholesky needs square matrices of one size, got/;
    expect(() => choleskyDecompose(createMatrix(2, 3), createMatrix(2, 2))).toThrow(
      "Cholesky needs square matrices of one size, got 2 × 3",
    );
    expect(() => choleskyDecompose(square, createMatrix(3, 2))).toThrow(message);
    expect(() => choleskyDecompose(square, createMatrix(2, 3))).toThrow(message);
  });
});
