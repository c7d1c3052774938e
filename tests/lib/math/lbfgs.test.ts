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

  it("steps by −P∇f first, then by the BFGS update of γP with γ = sᵀy / yᵀPy", () => {
    // f = ½ xᵀAx − bᵀx with A = [[3, 1], [1, 2]], b = (1, −1), and a preconditioner P = diag(¼, ½)
    // that is not A⁻¹. The doc of minimizeLbfgs: the first direction is −P∇f (unscaled), later
    // ones −H∇f with H the two-loop recursion's matrix, whose initial matrix is γP (Nocedal &
    // Wright, "Numerical Optimization", 2nd ed., eqs. 7.20 and 6.17; from memory). Each line search
    // tries the unit step first, so the trial points follow from the formulas alone.
    const f = (point: Float64Array, gradient: Float64Array) => {
      const [x, y] = point;
      gradient[0] = 3 * x + y - 1;
      gradient[1] = x + 2 * y + 1;
      return 0.5 * (3 * x * x + 2 * x * y + 2 * y * y) - x + y;
    };
    const evaluated: { x: number[]; g: number[]; value: number }[] = [];
    const reported: { iteration: number; gradientNorm: number }[] = [];
    const result = minimizeLbfgs(
      (point, gradient) => {
        const value = f(point, gradient);
        evaluated.push({ x: [...point], g: [...gradient], value });
        return value;
      },
      Float64Array.of(2, 1),
      {
        gradientTolerance: 1e-10,
        precondition: (vector) => {
          vector[0] *= 0.25;
          vector[1] *= 0.5;
        },
        onIteration: (iteration, gradientNorm) => reported.push({ iteration, gradientNorm }),
      },
    );
    const [x0, firstTrial] = evaluated;
    expect(firstTrial.x[0]).toBeCloseTo(x0.x[0] - 0.25 * x0.g[0], 14);
    expect(firstTrial.x[1]).toBeCloseTo(x0.x[1] - 0.5 * x0.g[1], 14);

    // The unit step passes Armijo here (f drops from 8 to −0.125), so the first trial is x₁.
    const x1 = firstTrial;
    const dotOf = (a: number[], b: number[]) =>
      a.reduce((total, value, i) => total + value * b[i], 0);
    const s = x1.x.map((value, i) => value - x0.x[i]);
    const y = x1.g.map((value, i) => value - x0.g[i]);
    const rho = 1 / dotOf(s, y);
    const py = [0.25 * y[0], 0.5 * y[1]];
    const gamma = dotOf(s, y) / dotOf(y, py);
    // H g = (I − ρ s yᵀ) γP (I − ρ y sᵀ) g + ρ s (sᵀ g).
    const g = x1.g;
    const v = g.map((value, i) => value - rho * y[i] * dotOf(s, g));
    const u = [gamma * 0.25 * v[0], gamma * 0.5 * v[1]];
    const hg = u.map((value, i) => value - rho * s[i] * dotOf(y, u) + rho * s[i] * dotOf(s, g));
    const secondTrial = evaluated[2].x;
    secondTrial.forEach((value, i) => expect(value).toBeCloseTo(x1.x[i] - hg[i], 12));

    // Hand-computed optimum A⁻¹b = (0.6, −0.8); the result reports the last accepted point, its
    // value and gradient, every evaluation, and each iteration's gradient norm in order.
    expect(result.x[0]).toBeCloseTo(0.6, 10);
    expect(result.x[1]).toBeCloseTo(-0.8, 10);
    expect(result.converged).toBe(true);
    expect(result.evaluations).toBe(evaluated.length);
    const last = evaluated[evaluated.length - 1];
    expect(result.value).toBe(last.value);
    expect(Array.from(result.gradient)).toEqual(last.g);
    expect(result.gradientNorm).toBeCloseTo(Math.hypot(last.g[0], last.g[1]), 15);
    expect(reported.map((entry) => entry.iteration)).toEqual(
      Array.from({ length: result.iterations }, (_, k) => k + 1),
    );
    expect(reported[0].gradientNorm).toBeCloseTo(Math.hypot(x1.g[0], x1.g[1]), 15);
    expect(reported[reported.length - 1].gradientNorm).toBe(result.gradientNorm);
  });

  it("steps by the BFGS matrix of its two newest pairs, updated oldest first", () => {
    // f(x) = Σ (xᵢ − i)⁴ + ½ Σ xᵢ² + x₀x₁/4 in three dimensions (not quadratic, so the fit takes many
    // steps). L-BFGS's matrix after pairs (s₁, y₁), (s₂, y₂) is H = U₂ U₁ (γ₂ I) with each
    // U: H ↦ (I − ρ s yᵀ) H (I − ρ y sᵀ) + ρ s sᵀ applied to the dense matrix, oldest pair first,
    // and γ₂ = s₂ᵀy₂ / y₂ᵀy₂ (Nocedal & Wright, "Numerical Optimization", 2nd ed., eqs. 6.17, 7.19
    // and 7.20; from memory): the third direction is −H ∇f.
    const f = (x: Float64Array, gradient: Float64Array) => {
      let value = (x[0] * x[1]) / 4;
      for (let i = 0; i < 3; i++) {
        value += (x[i] - i) ** 4 + 0.5 * x[i] * x[i];
        gradient[i] = 4 * (x[i] - i) ** 3 + x[i];
      }
      gradient[0] += x[1] / 4;
      gradient[1] += x[0] / 4;
      return value;
    };
    const evaluated: { x: number[]; g: number[] }[] = [];
    const accepted: number[] = [];
    minimizeLbfgs(
      (point, gradient) => {
        const value = f(point, gradient);
        evaluated.push({ x: [...point], g: [...gradient] });
        return value;
      },
      Float64Array.of(2, -1, 0.5),
      { gradientTolerance: 1e-10, onIteration: () => accepted.push(evaluated.length - 1) },
    );
    const [p0, p1, p2] = [evaluated[0], evaluated[accepted[0]], evaluated[accepted[1]]];
    const minus = (a: number[], b: number[]) => a.map((value, i) => value - b[i]);
    const dotOf = (a: number[], b: number[]) =>
      a.reduce((total, value, i) => total + value * b[i], 0);
    const pairs = [
      [minus(p1.x, p0.x), minus(p1.g, p0.g)],
      [minus(p2.x, p1.x), minus(p2.g, p1.g)],
    ];
    for (const [s, y] of pairs) expect(dotOf(s, y)).toBeGreaterThan(0);
    const identity = (i: number, j: number) => (i === j ? 1 : 0);
    const [s2, y2] = pairs[1];
    let h = [0, 1, 2].map((i) =>
      [0, 1, 2].map((j) => (identity(i, j) * dotOf(s2, y2)) / dotOf(y2, y2)),
    );
    for (const [s, y] of pairs) {
      const rho = 1 / dotOf(s, y);
      const left = [0, 1, 2].map((i) => [0, 1, 2].map((j) => identity(i, j) - rho * s[i] * y[j]));
      const product = (a: number[][], b: number[][]) =>
        a.map((row) =>
          [0, 1, 2].map((j) => row.reduce((total, value, k) => total + value * b[k][j], 0)),
        );
      const right = left.map((_, i) => left.map((row) => row[i]));
      h = product(product(left, h), right).map((row, i) =>
        row.map((value, j) => value + rho * s[i] * s[j]),
      );
    }
    const direction = h.map((row) => -dotOf(row, p2.g));
    const trial = evaluated[accepted[1] + 1].x;
    trial.forEach((value, i) => expect(value).toBeCloseTo(p2.x[i] + direction[i], 12));
  });

  it("stops after maxIterations, unconverged, at the last accepted point", () => {
    let calls = 0;
    const result = minimizeLbfgs(
      (x, gradient) => {
        calls++;
        gradient[0] = 4 * x[0] ** 3;
        return x[0] ** 4;
      },
      Float64Array.of(3),
      { gradientTolerance: 1e-12, maxIterations: 2 },
    );
    expect(result.iterations).toBe(2);
    expect(result.converged).toBe(false);
    expect(result.evaluations).toBe(calls);
    expect(result.value).toBeCloseTo(result.x[0] ** 4, 15);
  });

  it("does not search along a direction that is not downhill: it stops where it started", () => {
    // A "preconditioner" that is negative definite breaks the contract (it must be positive
    // definite): −P∇f then points uphill, and so does the restart from the preconditioned
    // gradient. The one evaluation is the start's: no line search runs.
    let calls = 0;
    const result = minimizeLbfgs(
      (x, gradient) => {
        calls++;
        gradient[0] = 2 * (x[0] - 1);
        return (x[0] - 1) ** 2;
      },
      Float64Array.of(3),
      {
        gradientTolerance: 1e-12,
        precondition: (vector) => {
          vector[0] = -vector[0];
        },
      },
    );
    expect({ calls, iterations: result.iterations, x: result.x[0] }).toEqual({
      calls: 1,
      iterations: 0,
      x: 3,
    });
    expect(result.converged).toBe(false);
  });

  // Near an optimum f is flat to rounding, so f(x + t d) can sit a few ulps above f(x) even at a
  // better point, and Armijo fails for every t. Hager & Zhang's approximate Wolfe conditions (SIAM
  // J. Optim. 16(1), 2005; from memory) accept such a step from the directional derivative d·∇f:
  // when f rose by at most 1e-10·|f| and 0.9·slope ≤ d·∇f(x + t d) ≤ −0.8·slope. Modelled here:
  // f = 4 + ½k(x − 1)² plus a bump away from the start standing in for rounding, with the exact
  // gradient, from x₀ = 1 + 10⁻⁶. The first step is −∇f, so at step t the ratio of the new slope
  // to the first is 1 − kt (hand-derived): k = 1 lands on the optimum (ratio 0), k = 0.05 falls
  // short (ratio ≥ 0.95 > 0.9 at every t ≤ 1), k = 1.9 overshoots (ratio −0.9 < −0.8 at t = 1).
  function searchBumpy(k: number, bump: number) {
    const points: number[] = [];
    const result = minimizeLbfgs(
      (x, gradient) => {
        gradient[0] = k * (x[0] - 1);
        points.push(x[0]);
        return 4 + 0.5 * k * (x[0] - 1) ** 2 + (points.length > 1 ? bump : 0);
      },
      Float64Array.of(1 + 1e-6),
      { gradientTolerance: 1e-12 },
    );
    return {
      converged: result.converged,
      iterations: result.iterations,
      calls: points.length,
      points,
    };
  }

  it("accepts a step by the approximate Wolfe conditions when f rose by rounding only", () => {
    const { points, ...outcome } = searchBumpy(1, 2e-10);
    expect(outcome).toEqual({ converged: true, iterations: 1, calls: 2 });
    expect(points[1]).toBeCloseTo(1, 15);
  });

  it("refuses a step whose f rose by more than 1e-10·|f|, trying 50 steps before it gives up", () => {
    const { converged, iterations, calls } = searchBumpy(1, 6e-10);
    expect({ converged, iterations, calls }).toEqual({
      converged: false,
      iterations: 0,
      calls: 51,
    });
  });

  it("refuses steps that leave the slope above 0.9 of the first (too short)", () => {
    const { converged, iterations, calls } = searchBumpy(0.05, 2e-10);
    expect({ converged, iterations, calls }).toEqual({
      converged: false,
      iterations: 0,
      calls: 51,
    });
  });

  it("refuses a step whose new slope passes −0.8 of the first, then takes 0.1 of it", () => {
    // At t = 1 the ratio is −0.9: refused. The quadratic through f(x₀), slope and the bumped
    // f(x₀ + d) has its minimizer far below 0.1, so t = 0.1 (ratio 0.81, accepted).
    const { points } = searchBumpy(1.9, 2e-10);
    [1 + 1e-6, 1 - 0.9e-6, 1 + 0.81e-6].forEach((expected, k) =>
      expect(points[k]).toBeCloseTo(expected, 14),
    );
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
