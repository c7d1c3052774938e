import { describe, expect, it } from "vitest";
import { minimizeLbfgs } from "@/lib/math/lbfgs";
import { runPythonJson } from "../analysis/support/run-python";

describe("minimizeLbfgs", () => {
  it("minimizes a separable quadratic to (1, −2) (hand-computed optimum)", () => {
    const result = minimizeLbfgs(
      (x, gradient) => {
        gradient[0] = 2 * (x[0] - 1);
        gradient[1] = 20 * (x[1] + 2);
        return (x[0] - 1) ** 2 + 10 * (x[1] + 2) ** 2;
      },
      new Float64Array(2),
      { gradientTolerance: 1e-10 },
    );
    expect(result.converged).toBe(true);
    expect(result.x[0]).toBeCloseTo(1, 10);
    expect(result.x[1]).toBeCloseTo(-2, 10);
  });

  it("finds the Rosenbrock minimum like scipy.optimize.minimize(method='L-BFGS-B')", () => {
    const size = 6;
    const rosenbrock = (x: Float64Array, gradient: Float64Array) => {
      let value = 0;
      gradient.fill(0);
      for (let i = 0; i < size - 1; i++) {
        const a = x[i + 1] - x[i] * x[i];
        const b = 1 - x[i];
        value += 100 * a * a + b * b;
        gradient[i] += -400 * x[i] * a - 2 * b;
        gradient[i + 1] += 200 * a;
      }
      return value;
    };
    const start = Float64Array.from({ length: size }, (_, i) => (i % 2 === 0 ? -1.2 : 1));
    // Outside reference: scipy.optimize.rosen with L-BFGS-B.
    const reference = runPythonJson<number[]>(
      `import json,sys
import numpy as np
from scipy.optimize import minimize, rosen, rosen_der
r=minimize(rosen, np.array(json.load(sys.stdin)), jac=rosen_der, method='L-BFGS-B', options={'gtol':1e-12,'ftol':0,'maxiter':10000})
print(json.dumps(r.x.tolist()))`,
      Array.from(start),
    );
    const result = minimizeLbfgs(rosenbrock, start, {
      gradientTolerance: 1e-9,
      maxIterations: 5000,
    });
    expect(result.converged).toBe(true);
    result.x.forEach((value, index) => expect(value).toBeCloseTo(reference[index], 6));
  });

  it("uses a preconditioner: an exact inverse Hessian converges in one step", () => {
    const result = minimizeLbfgs(
      (x, gradient) => {
        gradient[0] = 4 * x[0] - 4;
        gradient[1] = 100 * x[1];
        return 2 * x[0] ** 2 - 4 * x[0] + 50 * x[1] ** 2;
      },
      Float64Array.of(5, 5),
      {
        gradientTolerance: 1e-12,
        precondition: (vector) => {
          vector[0] /= 4;
          vector[1] /= 100;
        },
      },
    );
    expect(result.iterations).toBe(1);
    expect(result.x[0]).toBeCloseTo(1, 14);
  });

  it("returns at once when the start is already optimal", () => {
    const result = minimizeLbfgs(
      (x, gradient) => {
        gradient[0] = 2 * x[0];
        return x[0] * x[0];
      },
      Float64Array.of(0),
      { gradientTolerance: 1e-12 },
    );
    expect(result.iterations).toBe(0);
    expect(result.converged).toBe(true);
  });
});
