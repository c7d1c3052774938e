import { describe, expect, it } from "vitest";
import { DIRICHLET_ALPHA_RANGE, measureLabelSkew } from "@/lib/analysis/measure-label-skew";
import { measureQuantitySkew } from "@/lib/analysis/measure-quantity-skew";
import { runPythonJson } from "./support/run-python";

/** Four shards of unequal size over four classes, one class missing from two shards. */
const COUNTS = [
  [30, 5, 0, 15],
  [2, 40, 8, 0],
  [10, 10, 10, 10],
  [1, 0, 60, 19],
];

describe("label skew (methods.md §4) against SciPy", () => {
  it("gives each shard's divergences, the size-weighted means and the maxima as SciPy does", () => {
    // Outside reference: scipy.stats.entropy (KL and H), scipy.spatial.distance.jensenshannon
    // (squared: the divergence), the ½-convention TV and Hellinger written with NumPy, and
    // numpy.average with the shard sizes as weights.
    const reference = runPythonJson<{
      pooled: number[];
      shards: {
        tv: number;
        hellinger: number;
        js: number;
        kl: number;
        present: number;
        effective: number;
      }[];
      mean: Record<string, number>;
      max: Record<string, number>;
    }>(
      `import json,sys
import numpy as np
from scipy.stats import entropy
from scipy.spatial.distance import jensenshannon
counts=np.array(json.load(sys.stdin),float)
n=counts.sum(1); p=counts.sum(0)/counts.sum()
shards=[]
for row in counts:
    q=row/row.sum()
    shards.append({"tv":float(0.5*np.abs(q-p).sum()),"hellinger":float(np.sqrt(1-np.sqrt(q*p).sum())),
      "js":float(jensenshannon(q,p)**2),"kl":float(entropy(q,p)),"present":int(np.count_nonzero(q)),
      "effective":float(np.exp(entropy(q)))})
keys=["tv","hellinger","js","kl"]
print(json.dumps({"pooled":p.tolist(),"shards":shards,
  "mean":{k:float(np.average([s[k] for s in shards],weights=n)) for k in keys},
  "max":{k:float(max(s[k] for s in shards)) for k in keys}}))`,
      COUNTS,
    );
    const skew = measureLabelSkew(COUNTS);
    skew.pooled.forEach((value, c) => expect(value).toBeCloseTo(reference.pooled[c], 15));
    skew.shards.forEach((shard, m) => {
      const expected = reference.shards[m];
      expect(shard.tv).toBeCloseTo(expected.tv, 14);
      expect(shard.hellinger).toBeCloseTo(expected.hellinger, 14);
      expect(shard.js).toBeCloseTo(expected.js, 14);
      expect(shard.kl).toBeCloseTo(expected.kl, 14);
      expect(shard.classesPresent).toBe(expected.present);
      expect(shard.effectiveClasses).toBeCloseTo(expected.effective, 13);
      expect(shard.counts).toEqual(COUNTS[m]);
    });
    for (const key of ["tv", "hellinger", "js", "kl"] as const) {
      expect(skew[key]).toBeCloseTo(reference.mean[key], 14);
      expect(skew.max[key]).toBeCloseTo(reference.max[key], 14);
    }
  });

  it("fits α̂ where SciPy's bounded search finds the Dirichlet-multinomial likelihood's top", () => {
    const counts = [
      [20, 12, 8, 10],
      [9, 25, 11, 5],
      [14, 9, 19, 8],
      [6, 10, 12, 22],
      [15, 15, 10, 10],
    ];
    // Outside reference: the log-likelihood of methods.md §4 written with scipy.special.gammaln,
    // maximized on log α by scipy.optimize.minimize_scalar (bounded) inside the bracket of a grid.
    const alpha = runPythonJson<number>(
      `import json,sys
import numpy as np
from scipy.special import gammaln
from scipy.optimize import minimize_scalar
x=np.array(json.load(sys.stdin),float); n=x.sum(1); p=x.sum(0)/x.sum()
def nll(t):
    a=np.exp(t)
    return -float(np.sum(gammaln(a)-gammaln(n+a)) + np.sum(gammaln(x+a*p)-gammaln(a*p)))
grid=np.linspace(np.log(1e-3),np.log(1e6),400); k=int(np.argmin([nll(t) for t in grid]))
r=minimize_scalar(nll,bounds=(grid[max(k-1,0)],grid[min(k+1,399)]),method="bounded",options={"xatol":1e-10})
print(json.dumps(float(np.exp(r.x))))`,
      counts,
    );
    expect(alpha).toBeGreaterThan(1);
    expect(alpha).toBeLessThan(1e4);
    // methods.md §4: a relative precision of 1e-6 in α; the likelihood is flat at its top, so both
    // searches agree to about the square root of rounding there.
    expect(Math.abs(measureLabelSkew(counts).dirichletAlpha / alpha - 1)).toBeLessThan(1e-5);
    // A category no shard holds adds log Γ(0 + 0) − log Γ(0) = 0 to every shard's likelihood
    // (methods.md §4 fits counts, which handles empty classes), so α̂ does not move.
    const withEmpty = counts.map((row) => [0, ...row, 0]);
    expect(measureLabelSkew(withEmpty).dirichletAlpha).toBe(
      measureLabelSkew(counts).dirichletAlpha,
    );
  });

  it("puts α̂ at the ends of [1e-3, 1e6] for identical shards and for one class per shard (methods.md §4)", () => {
    expect(DIRICHLET_ALPHA_RANGE).toEqual([1e-3, 1e6]);
    // Identical proportions: the likelihood rises toward α → ∞, so the search ends at 1e6.
    expect(
      measureLabelSkew([
        [10, 20, 30],
        [20, 40, 60],
        [5, 10, 15],
      ]).dirichletAlpha,
    ).toBe(1e6);
    // One class per shard: it rises toward α → 0, so the search ends at 1e-3.
    expect(
      measureLabelSkew([
        [50, 0, 0],
        [0, 50, 0],
        [0, 0, 50],
      ]).dirichletAlpha,
    ).toBe(1e-3);
  });
});

describe("quantity skew (methods.md §4) against NumPy", () => {
  it("gives Gini as NumPy's mean absolute difference over twice the mean, and CV, min, max", () => {
    const sizes = [120, 5, 40, 40, 900, 1, 73];
    // Outside reference: Gini = Σᵢ Σⱼ |nᵢ − nⱼ| / (2 M² mean) (the mean-difference definition, equal
    // to methods.md's sorted sum; standard), numpy.std (population) / numpy.mean, numpy min/max.
    const reference = runPythonJson<{ gini: number; cv: number; min: number; max: number }>(
      `import json,sys
import numpy as np
n=np.array(json.load(sys.stdin),float); M=len(n)
print(json.dumps({"gini":float(np.abs(n[:,None]-n[None,:]).sum()/(2*M*M*n.mean())),
  "cv":float(n.std()/n.mean()),"min":float(n.min()),"max":float(n.max())}))`,
      sizes,
    );
    const skew = measureQuantitySkew(sizes);
    expect(skew.gini).toBeCloseTo(reference.gini, 14);
    expect(skew.cv).toBeCloseTo(reference.cv, 14);
    expect(skew.min).toBe(reference.min);
    expect(skew.max).toBe(reference.max);
    // The sizes are not sorted in place.
    expect(sizes).toEqual([120, 5, 40, 40, 900, 1, 73]);
  });
});
