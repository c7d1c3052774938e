import { describe, expect, it } from "vitest";
import {
  addCompensated,
  CompensatedSum,
  dot,
  norm,
  roundingError,
  squaredNorm,
  sumPairwise,
} from "@/lib/math/summation";
import { runPythonJson } from "../analysis/support/run-python";

describe("sumPairwise", () => {
  it("matches Python's exactly rounded math.fsum on a long ill-conditioned sum", () => {
    const values = new Float64Array(1_000_003);
    let state = 12345;
    for (let index = 0; index < values.length; index++) {
      state = (state * 1103515245 + 12345) % 2147483648;
      values[index] = (state / 2147483648 - 0.3) * 10 ** ((index % 7) - 3);
    }
    // Outside reference: Python's math.fsum is exactly rounded (Shewchuk's algorithm).
    const exact = runPythonJson<number>(
      "import json,sys,math; print(json.dumps(math.fsum(json.load(sys.stdin))))",
      Array.from(values),
    );
    let naive = 0;
    let absoluteTotal = 0;
    for (const value of values) {
      naive += value;
      absoluteTotal += Math.abs(value);
    }
    const pairwiseError = Math.abs(sumPairwise(values) - exact);
    // Error bound for pairwise summation: about ε·log₂(n)·Σ|x| (Higham §4.2, from memory).
    expect(pairwiseError).toBeLessThanOrEqual(Number.EPSILON * 20 * absoluteTotal);
    expect(pairwiseError).toBeLessThanOrEqual(Math.abs(naive - exact) + 1e-12);
  });

  it("sums an empty range to zero", () => {
    expect(sumPairwise(new Float64Array(0))).toBe(0);
  });
});

describe("compensated sums", () => {
  it("keeps the small terms that naive summation loses (Neumaier's example)", () => {
    const sum = new CompensatedSum();
    for (const value of [1, 1e100, 1, -1e100]) sum.add(value);
    // Exact value 2: Python's math.fsum([1, 1e100, 1, -1e100]) (exactly rounded) also gives 2.0.
    expect(sum.value).toBe(2);
  });

  it("takes exactly the rounding error of each addition, as exact rational arithmetic finds it", () => {
    const pairs: [number, number][] = [
      [1e100, 1],
      [0.1, 0.2],
      [-3.5e-8, 1.0000001],
      [2 ** 53, 1],
      [1e-300, -1e300],
    ];
    // Outside reference: Python's fractions.Fraction computes a + b − fl(a + b) exactly.
    const reference = runPythonJson<number[]>(
      `import sys, json
from fractions import Fraction
pairs = [(float(a), float(b)) for a, b in json.load(sys.stdin)]
print(json.dumps([float(Fraction(a) + Fraction(b) - Fraction(a + b)) for a, b in pairs]))`,
      pairs,
    );
    // (+ 0 makes a −0 error, which JSON cannot carry, compare as 0.)
    expect(pairs.map(([a, b]) => roundingError(a, b, a + b) + 0)).toEqual(reference);
    expect(reference.some((error) => error !== 0)).toBe(true);
  });

  it("merges arrays elementwise with compensation", () => {
    const target = Float64Array.of(1);
    const compensation = new Float64Array(1);
    for (const value of [1e100, -1e100, 1])
      addCompensated(target, compensation, Float64Array.of(value));
    expect(target[0] + compensation[0]).toBe(2);
  });
});

describe("norms", () => {
  it("computes dot products and norms of small vectors (hand-computed)", () => {
    expect(dot(Float64Array.of(1, 2, 3), 0, Float64Array.of(4, 5, 6), 0, 3)).toBe(32);
    expect(norm(Float64Array.of(3, 4))).toBe(5);
    expect(squaredNorm(Float64Array.of(3, 4))).toBe(25);
  });

  it("does not overflow on huge entries", () => {
    expect(norm(Float64Array.of(1e200, 1e200))).toBeCloseTo(Math.SQRT2 * 1e200, -185);
    expect(norm(Float64Array.of(1e-200, 1e-200)) / 1e-200).toBeCloseTo(Math.SQRT2, 14);
  });

  it("propagates NaN", () => {
    expect(norm(Float64Array.of(1, Number.NaN))).toBeNaN();
    // IEEE 754: any operation on NaN gives NaN; the squared norm must not say Infinity.
    expect(squaredNorm(Float64Array.of(1, Number.NaN))).toBeNaN();
    expect(squaredNorm(Float64Array.of(Number.NaN, Infinity))).toBeNaN();
    expect(squaredNorm(Float64Array.of(1, -Infinity))).toBe(Infinity);
  });
});
