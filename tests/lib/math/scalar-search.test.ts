import { describe, expect, it } from "vitest";
import { maximizeOnInterval } from "@/lib/math/scalar-search";
import { runPythonJson } from "../analysis/support/run-python";

describe("maximizeOnInterval stays on [lower, upper]", () => {
  it("returns the end itself where the function rises past it (hand-computed maxima at the ends)", () => {
    // Each function is larger just outside the interval than anywhere inside it, so a bracket that
    // strays outside would return a point beyond the end.
    const cases: [(x: number) => number, number, number, number][] = [
      [(x) => x, -3, 4, 4],
      [(x) => (x - 1.2) ** 2, 1, 2, 2],
      [(x) => (x - 1.8) ** 2, 1, 2, 1],
      [(x) => -x, 0.5, 9, 0.5],
    ];
    for (const [objective, lower, upper, end] of cases) {
      const result = maximizeOnInterval(objective, lower, upper);
      expect(result.argument).toBeGreaterThanOrEqual(lower);
      expect(result.argument).toBeLessThanOrEqual(upper);
      expect(result.argument).toBeCloseTo(end, 12);
      expect(result.value).toBe(objective(result.argument));
    }
  });

  it("finds the highest of several peaks to the tolerance, as SciPy's bounded search does", () => {
    // sin(5πx) − 0.3x has three peaks on [0, 1]; the first is the highest.
    const reference = runPythonJson<number>(
      `import json
import numpy as np
from scipy.optimize import minimize_scalar
f=lambda x: -(np.sin(5*np.pi*x)-0.3*x)
grid=np.linspace(0,1,10001); k=int(np.argmin(f(grid)))
r=minimize_scalar(f,bounds=(grid[k-1],grid[k+1]),method="bounded",options={"xatol":1e-12})
print(json.dumps(float(r.x)))`,
    );
    const result = maximizeOnInterval((x) => Math.sin(5 * Math.PI * x) - 0.3 * x, 0, 1, {
      tolerance: 1e-10,
    });
    expect(Math.abs(result.argument - reference)).toBeLessThan(1e-8);
  });

  it("refuses an empty interval, naming it", () => {
    expect(() => maximizeOnInterval((x) => x, 2, 2)).toThrow("empty interval [2, 2]");
    expect(() => maximizeOnInterval((x) => x, 3, 1)).toThrow("empty interval [3, 1]");
  });
});
