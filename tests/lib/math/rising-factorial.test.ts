import { describe, expect, it } from "vitest";
import { logGamma, logRisingFactorial } from "@/lib/math/special-functions";
import { runPythonJson } from "../analysis/support/run-python";

describe("logRisingFactorial where log Γ differences lose digits", () => {
  it("agrees with mpmath's 50-digit log Γ(a + n) − log Γ(a) to 1e-14 relative, Stirling's corrections included", () => {
    // a ≥ 100 with n ≥ 64 takes Stirling's series: at a = 100 its 1/(360x³) and 1/(1260x⁵) terms
    // matter at this tolerance; at a = 1e7 a difference of two log Γ values near 1.5e8 would be
    // off by about 1e-8.
    const cases: [number, number][] = [
      [100, 64],
      [100, 1000],
      [250.5, 80],
      [1e7, 100],
      [1e9, 64],
    ];
    // Outside reference: mpmath.loggamma at 50 significant digits (Debian's python3-mpmath).
    const reference = runPythonJson<number[]>(
      `import json,sys
import mpmath
mpmath.mp.dps=50
print(json.dumps([float(mpmath.loggamma(mpmath.mpf(a)+n)-mpmath.loggamma(mpmath.mpf(a))) for a,n in json.load(sys.stdin)]))`,
      cases,
    );
    cases.forEach(([a, n], index) =>
      expect(Math.abs(logRisingFactorial(a, n) / reference[index] - 1)).toBeLessThan(1e-14),
    );
  });

  it("names the argument it refuses", () => {
    expect(() => logGamma(-2)).toThrow("logGamma needs x > 0, got -2");
  });
});
