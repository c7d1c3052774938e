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

  it("keeps a full memory's pairs when a new pair has sᵀy ≤ 0 and steps by the kept pair's BFGS matrix", () => {
    // f = (x² − 1)² + 2y² + xy/2: a double well in x (negative curvature near x = 0) coupled to y.
    // From (0.1, 1) with memory 1, the first pair has sᵀy > 0 (the memory is full) and the second
    // sᵀy < 0 (rejected): both are asserted below, so the test reaches the case it is about.
    const f = (point: Float64Array, gradient: Float64Array) => {
      const [x, y] = point;
      gradient[0] = 4 * x * (x * x - 1) + y / 2;
      gradient[1] = 4 * y + x / 2;
      return (x * x - 1) ** 2 + 2 * y * y + (x * y) / 2;
    };
    const evaluated: { x: number[]; g: number[] }[] = [];
    const accepted: number[] = [];
    const start = [0.1, 1];
    minimizeLbfgs(
      (point, gradient) => {
        const value = f(point, gradient);
        evaluated.push({ x: [...point], g: [...gradient] });
        return value;
      },
      Float64Array.from(start),
      {
        gradientTolerance: 1e-10,
        memory: 1,
        onIteration: () => accepted.push(evaluated.length - 1),
      },
    );
    const [x0, x1, x2] = [evaluated[0], evaluated[accepted[0]], evaluated[accepted[1]]];
    const minus = (a: number[], b: number[]) => a.map((value, i) => value - b[i]);
    const dotOf = (a: number[], b: number[]) =>
      a.reduce((total, value, i) => total + value * b[i], 0);
    const [s1, y1] = [minus(x1.x, x0.x), minus(x1.g, x0.g)];
    const [s2, y2] = [minus(x2.x, x1.x), minus(x2.g, x1.g)];
    expect(dotOf(s1, y1)).toBeGreaterThan(0);
    expect(dotOf(s2, y2)).toBeLessThan(0);

    // The next direction is −H g₂ with H the BFGS update of γI by the kept pair (s₁, y₁) alone:
    // H = (I − ρ s yᵀ) γ (I − ρ y sᵀ) + ρ s sᵀ, ρ = 1/sᵀy, γ = sᵀy/yᵀy (Nocedal & Wright,
    // "Numerical Optimization", 2nd ed., eqs. 6.17 and 7.20; from memory). Its first trial point
    // takes the unit step.
    const rho = 1 / dotOf(s1, y1);
    const gamma = dotOf(s1, y1) / dotOf(y1, y1);
    const g2 = x2.g;
    // v = (I − ρ y sᵀ) g₂, then H g₂ = (I − ρ s yᵀ) γ v + ρ s (sᵀ g₂).
    const v = g2.map((value, i) => value - rho * y1[i] * dotOf(s1, g2));
    const u = v.map((value) => gamma * value);
    const hg = u.map(
      (value, i) => value - rho * s1[i] * dotOf(y1, u) + rho * s1[i] * dotOf(s1, g2),
    );
    const trial = evaluated[accepted[1] + 1].x;
    trial.forEach((value, i) => expect(value).toBeCloseTo(x2.x[i] - hg[i], 12));
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
