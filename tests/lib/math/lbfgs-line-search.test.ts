import { describe, expect, it } from "vitest";
import { minimizeLbfgs, type ValueAndGradient } from "@/lib/math/lbfgs";

/** The points minimizeLbfgs evaluates on a one-dimensional f, in order. */
function trialPoints(f: (x: number) => [number, number], start: number, count: number): number[] {
  const points: number[] = [];
  const valueAndGradient: ValueAndGradient = (x, gradient) => {
    points.push(x[0]);
    const [value, slope] = f(x[0]);
    gradient[0] = slope;
    return value;
  };
  minimizeLbfgs(valueAndGradient, Float64Array.of(start), { gradientTolerance: 1e-12 });
  return points.slice(0, count);
}

function expectPoints(points: number[], expected: number[]) {
  expect(points).toHaveLength(expected.length);
  expected.forEach((value, k) => expect(points[k]).toBeCloseTo(value, 14));
}

/** a (x − c)² and its derivative. */
const parabola =
  (a: number, c: number) =>
  (x: number): [number, number] => [a * (x - c) ** 2, 2 * a * (x - c)];

// Each expected trial point below is worked out by hand from the line search stated on
// minimizeLbfgs (first direction −∇f shortened to at most unit length, unit step first, Armijo
// with 10⁻⁴, quadratic interpolation kept within [0.1 t, 0.5 t], 0.1 t where f is not finite).
describe("minimizeLbfgs's first line search", () => {
  it("steps along −∇f itself when ‖∇f‖ < 1: 0.1 (x − 3)² from 2.5 tries 2.6 and accepts it", () => {
    expectPoints(trialPoints(parabola(0.1, 3), 2.5, 2), [2.5, 2.6]);
  });

  it("backtracks to the parabola's minimizer: 10 (x − 0.7)² from 1 tries 0, then 0.7", () => {
    // ∇f(1) = 6, so d = −1; f(0) = 4.9 fails Armijo; the quadratic through f(1), f'(1)·d and f(0)
    // is f itself, minimized at t = 0.3, inside [0.1, 0.5].
    expectPoints(trialPoints(parabola(10, 0.7), 1, 3), [1, 0, 0.7]);
  });

  it("demands a decrease of 10⁻⁴ t |∇fᵀd|: 0.99999 x² from 0.25 refuses −0.249995, then halves", () => {
    // ∇f(0.25) = 0.499995, so d = −0.499995 and x₀ + d = −0.249995, where f fell by only 2.5e-6,
    // less than 10⁻⁴ · 0.499995² ≈ 2.5e-5 (and the new slope is about −1 times the first, so the
    // approximate Wolfe test refuses it too). The quadratic's minimizer t ≈ 0.500005 is cut to
    // 0.5: x = 0.0000025.
    expectPoints(trialPoints(parabola(0.99999, 0), 0.25, 3), [0.25, -0.249995, 0.0000025]);
  });

  it("keeps the backtrack at least 0.1 t: 10 (x − 0.93)² from 1 tries 0, then 0.9", () => {
    // The parabola's minimizer t = 0.07 is below 0.1, so t = 0.1 (x = 0.9), which passes Armijo.
    expectPoints(trialPoints(parabola(10, 0.93), 1, 3), [1, 0, 0.9]);
  });

  it("cuts the step tenfold where f is NaN too: the same f through Math.log", () => {
    const barrier = (x: number): [number, number] => [-Math.log(x) + 10 * x, -1 / x + 10];
    expect(Number.isNaN(barrier(-0.5)[0])).toBe(true);
    expectPoints(trialPoints(barrier, 0.5, 3), [0.5, -0.5, 0.4]);
  });

  it("cuts the step tenfold where f is not finite: −log x + 10x from 0.5 tries −0.5, then 0.4", () => {
    const barrier = (x: number): [number, number] =>
      x > 0 ? [-Math.log(x) + 10 * x, -1 / x + 10] : [Infinity, Number.NaN];
    expectPoints(trialPoints(barrier, 0.5, 3), [0.5, -0.5, 0.4]);
  });
});
