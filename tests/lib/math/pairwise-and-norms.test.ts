import { describe, expect, it } from "vitest";
import { dot, norm, squaredNorm, sumPairwise } from "@/lib/math/summation";
import { runPythonJson } from "../analysis/support/run-python";

describe("sumPairwise's error bound", () => {
  it("stays within ε·log₂(n)·Σ|x| of Python's math.fsum where left-to-right summation does not", () => {
    // 2²⁰ + 3 copies of 0.1 and a slice of them: left to right, the error grows like n·ε (about
    // 1e-6 here); pairwise, like ε·log₂ n (Higham, "Accuracy and Stability of Numerical
    // Algorithms", 2nd ed., §4.2; from memory).
    const values = new Float64Array(2 ** 20 + 3).fill(0.1);
    const ranges: [number, number][] = [
      [0, values.length],
      [5, 700_001],
    ];
    // Outside reference: Python's math.fsum is exactly rounded.
    const exact = runPythonJson<number[]>(
      `import json,sys,math
print(json.dumps([math.fsum([0.1]*(end-start)) for start,end in json.load(sys.stdin)]))`,
      ranges,
    );
    ranges.forEach(([start, end], index) => {
      const count = end - start;
      const bound = Number.EPSILON * Math.log2(count) * 0.1 * count;
      let naive = 0;
      for (let k = start; k < end; k++) naive += values[k];
      expect(Math.abs(naive - exact[index])).toBeGreaterThan(100 * bound);
      expect(Math.abs(sumPairwise(values, start, end) - exact[index])).toBeLessThanOrEqual(bound);
    });
  });
});

describe("dot and norms at the edges", () => {
  it("takes a dot product of slices at offsets (hand-computed)", () => {
    const a = Float64Array.of(9, 1, 2, 3, 9);
    const b = Float64Array.of(9, 9, 4, 5, 6, 9);
    expect(dot(a, 1, b, 2, 3)).toBe(32);
  });

  it("gives 0 for a zero or empty vector, and scales tiny entries like Python's math.hypot", () => {
    expect(norm(new Float64Array(3))).toBe(0);
    expect(squaredNorm(new Float64Array(3))).toBe(0);
    expect(norm(new Float64Array(0))).toBe(0);
    expect(squaredNorm(new Float64Array(0))).toBe(0);
    const tiny = [3e-170, -4e-170, 1e-171];
    // Outside reference: Python's math.hypot, which scales as well (NumPy's norm of this vector
    // underflows to 0: (3e-170)² is below the smallest double).
    const reference = runPythonJson<number>(
      "import json,sys,math; print(json.dumps(math.hypot(*json.load(sys.stdin))))",
      tiny,
    );
    expect(norm(Float64Array.from(tiny)) / reference).toBeCloseTo(1, 14);
    expect(
      squaredNorm(Float64Array.from(tiny.map((v) => v * 1e150))) / (reference * 1e150) ** 2,
    ).toBeCloseTo(1, 14);
    expect(norm(Float64Array.of(Infinity, 1))).toBe(Infinity);
  });
});
