import { describe, expect, it } from "vitest";
import {
  hellingerDistance,
  jensenShannonDivergence,
  klDivergence,
  shannonEntropy,
  totalVariation,
} from "@/lib/math/divergences";
import { logGamma, logRisingFactorial } from "@/lib/math/special-functions";
import { runPythonJson } from "../analysis/support/run-python";

describe("logGamma", () => {
  it("matches scipy.special.gammaln from tiny to huge arguments", () => {
    const points = [1e-8, 0.1, 0.5, 1, 1.5, 2, 3.7, 10, 123.4, 1e4, 1e6, 3e8];
    // Outside reference: scipy.special.gammaln.
    const reference = runPythonJson<number[]>(
      `import json,sys
from scipy.special import gammaln
print(json.dumps([float(gammaln(x)) for x in json.load(sys.stdin)]))`,
      points,
    );
    points.forEach((x, index) => {
      const expected = reference[index];
      expect(Math.abs(logGamma(x) - expected)).toBeLessThanOrEqual(
        1e-13 * Math.max(1, Math.abs(expected)),
      );
    });
  });

  it("knows log Γ(5) = log 24 and log Γ(½) = log √π (textbook values)", () => {
    expect(logGamma(5)).toBeCloseTo(Math.log(24), 14);
    expect(logGamma(0.5)).toBeCloseTo(0.5 * Math.log(Math.PI), 14);
  });

  it("rejects non-positive arguments", () => {
    expect(() => logGamma(0)).toThrow(RangeError);
    expect(() => logGamma(Number.NaN)).toThrow(RangeError);
  });

  it("computes log rising factorials accurately for huge a (Python math.fsum of the logs)", () => {
    const cases: Array<[number, number]> = [
      [1, 4],
      [1e6, 1],
      [1e6, 30],
      [2.5, 200],
      [0.01, 5000],
      [1e6, 120],
      [123.5, 100000],
      [99.5, 70],
    ];
    // Outside reference: Σ_{j<n} log(a + j) summed exactly rounded by Python's math.fsum.
    const reference = runPythonJson<number[]>(
      `import json,sys,math
out=[]
for a,n in json.load(sys.stdin):
    out.append(math.fsum(math.log(a+j) for j in range(n)))
print(json.dumps(out))`,
      cases,
    );
    cases.forEach(([a, n], index) =>
      expect(Math.abs(logRisingFactorial(a, n) - reference[index])).toBeLessThanOrEqual(
        1e-12 * Math.max(1, Math.abs(reference[index])),
      ),
    );
  });
});

describe("divergences", () => {
  it("reproduces Kullback's example quoted in methods.md §4", () => {
    const p = [0.36, 0.48, 0.16];
    const uniform = [1 / 3, 1 / 3, 1 / 3];
    // Published: KL(P‖Q) = 0.0852996, KL(Q‖P) = 0.097455 nats (Kullback 1959, via methods.md §4).
    expect(klDivergence(p, uniform)).toBeCloseTo(0.0852996, 7);
    expect(klDivergence(uniform, p)).toBeCloseTo(0.097455, 6);
  });

  it("reproduces SciPy's documented jensenshannon([1, 0], [.5, .5]) = 0.46450140402245893 as √JS", () => {
    // Published in SciPy's documentation (quoted in methods.md §4); JS is its square.
    expect(Math.sqrt(jensenShannonDivergence([1, 0], [0.5, 0.5]))).toBeCloseTo(
      0.46450140402245893,
      15,
    );
  });

  it("matches SciPy on random distributions (entropy, jensenshannon) and hand formulas", () => {
    const pairs = [
      [
        [0.1, 0.2, 0.7, 0],
        [0.25, 0.25, 0.25, 0.25],
      ],
      [
        [0.5, 0.5, 0, 0],
        [0.1, 0.1, 0.4, 0.4],
      ],
    ];
    // Outside reference: scipy.stats.entropy(q, p) = KL, scipy.spatial.distance.jensenshannon² = JS.
    const reference = runPythonJson<
      Array<{ kl: number; js: number; tv: number; h: number; e: number }>
    >(
      `import json,sys
import numpy as np
from scipy.stats import entropy
from scipy.spatial.distance import jensenshannon
out=[]
for q,p in json.load(sys.stdin):
    q=np.array(q); p=np.array(p)
    out.append({"kl":float(entropy(q,p)),"js":float(jensenshannon(q,p)**2),"tv":float(0.5*np.abs(q-p).sum()),
                "h":float(np.sqrt(1-np.sqrt(q*p).sum())),"e":float(entropy(q))})
print(json.dumps(out))`,
      pairs,
    );
    pairs.forEach(([q, p], index) => {
      expect(klDivergence(q, p)).toBeCloseTo(reference[index].kl, 14);
      expect(jensenShannonDivergence(q, p)).toBeCloseTo(reference[index].js, 14);
      expect(totalVariation(q, p)).toBeCloseTo(reference[index].tv, 15);
      expect(hellingerDistance(q, p)).toBeCloseTo(reference[index].h, 14);
      expect(shannonEntropy(q)).toBeCloseTo(reference[index].e, 14);
    });
  });

  it("is zero for identical distributions and ln 2 for disjoint ones (identities)", () => {
    const q = [0.2, 0.3, 0.5];
    expect(totalVariation(q, q)).toBe(0);
    expect(hellingerDistance(q, q)).toBeLessThan(1e-7);
    expect(jensenShannonDivergence(q, q)).toBe(0);
    expect(klDivergence(q, q)).toBe(0);
    expect(jensenShannonDivergence([1, 0], [0, 1])).toBeCloseTo(Math.LN2, 15);
    expect(klDivergence([1, 0], [0, 1])).toBe(Infinity);
  });
});
