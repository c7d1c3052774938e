import { describe, expect, it } from "vitest";
import { sumFeaturesPerShard } from "@/lib/analysis/measure-feature-shift";
import { analyzeText } from "./support/analyze-text";
import { runPythonJson } from "./support/run-python";

const relativeError = (value: number, expected: number) =>
  Math.abs(value - expected) / Math.abs(expected);

describe("within-shard noise σₘ² by two passes (methods.md §3)", () => {
  it("keeps its digits where E‖∇ℓ‖² − ‖E∇ℓ‖² loses them, against NumPy's two-pass variance", async () => {
    // Invented on purpose (seeded NumPy): two shards whose rows sit within 1e-6 of ±1 in the
    // feature and the target, so at W = 0 every per-row gradient −yᵢx̃ᵢ is within about 1e-6 of
    // its shard's mean, σₘ² ≈ 3e-12 while ‖E∇ℓ‖² ≈ 2. NumPy computes σₘ² as the mean squared
    // distance from the mean (two passes) and also the one-pass form, which here is off by
    // about 3e-4 relative: the test first checks that the cancellation is real.
    const reference = runPythonJson<{
      csv: string;
      twoPass: number[];
      onePass: number[];
      pooled: number;
    }>(`import json
import numpy as np
rng=np.random.default_rng(11)
n=300; d=1e-6
side=np.where(np.arange(n)<n//2,1.0,-1.0)
x=side*(1+d*rng.standard_normal(n)); y=side*(1+d*rng.standard_normal(n))
shard=np.where(side>0,"a","b")
csv="\\n".join(["x,y,shard"]+[f"{a!r},{b!r},{s}" for a,b,s in zip(x,y,shard)])+"\\n"
X=(x-x.mean())/x.std(); Y=(y-y.mean())/y.std()
per=(-Y)[:,None]*np.column_stack([X,np.ones(n)])
two=lambda g: float(np.mean(np.sum((g-g.mean(0))**2,axis=1)))
one=lambda g: float(np.mean(np.sum(g**2,axis=1))-np.sum(g.mean(0)**2))
print(json.dumps({"csv":csv,"twoPass":[two(per[shard==s]) for s in "ab"],
 "onePass":[one(per[shard==s]) for s in "ab"],"pooled":two(per)}))`);
    for (const [m, expected] of reference.twoPass.entries()) {
      expect(relativeError(reference.onePass[m], expected)).toBeGreaterThan(1e-5);
    }
    const summary = await analyzeText(reference.csv, {
      labelColumn: "y",
      shardColumn: "shard",
      task: "regression",
      reference: "zero",
    });
    // Rounding x̃ differently from NumPy (ε per entry) moves a 1e-6 deviation by about 1e-10 of
    // itself, so 1e-8 relative is some 100 times the reachable accuracy, 1/30 of the one-pass error.
    summary.shards.forEach((shard, m) =>
      expect(relativeError(shard.sigma2, reference.twoPass[m])).toBeLessThan(1e-8),
    );
    const weights = summary.shards.map((shard) => shard.rows / summary.dataset.rows);
    const sigma2 = weights.reduce((total, w, m) => total + w * reference.twoPass[m], 0);
    expect(relativeError(summary.heterogeneity.sigma2, sigma2)).toBeLessThan(1e-8);
    expect(relativeError(summary.heterogeneity.sigma2Pooled, reference.pooled)).toBeLessThan(1e-12);
  });
});

describe("feature shift (methods.md §4)", () => {
  it("matches NumPy on scikit-learn's wine data in seeded shards", async () => {
    // Outside reference: sklearn.datasets.load_wine (178 rows, 13 features), shards from NumPy
    // default_rng(3); per shard the RMS over features of the shard mean of the features
    // standardized with the pooled mean and population deviation.
    const reference = runPythonJson<{ csv: string; shift: Record<string, number> }>(`import json,io
import numpy as np
from sklearn.datasets import load_wine
frame=load_wine(as_frame=True).frame
frame["shard"]=["s"+str(v) for v in np.random.default_rng(3).integers(0,4,len(frame))]
out=io.StringIO(); frame.to_csv(out,index=False,float_format="%.17g")
X=frame.drop(columns=["target","shard"]).to_numpy(float); Z=(X-X.mean(0))/X.std(0)
shards=frame["shard"].to_numpy()
print(json.dumps({"csv":out.getvalue(),
 "shift":{s:float(np.sqrt(np.mean(Z[shards==s].mean(0)**2))) for s in sorted(set(shards))}}))`);
    const summary = await analyzeText(reference.csv, {
      labelColumn: "target",
      shardColumn: "shard",
    });
    expect(summary.shards.map((shard) => shard.id)).toEqual(Object.keys(reference.shift).sort());
    for (const shard of summary.shards) {
      // Shard means of O(1) values over about 45 rows: 1e-12 leaves room for summation order.
      expect(shard.featureShift).toBeCloseTo(reference.shift[shard.id], 12);
    }
  });

  it("sums a shard's features with compensation", () => {
    // Identity: 1 + 1e16 + 1 − 1e16 = 2 exactly; summed left to right in doubles it gives 0
    // (1e16 + 1 rounds to 1e16), so the mean would be 0 instead of ½.
    const x = Float64Array.of(1, 1, 1e16, 1, 1, 1, -1e16, 1);
    const sums = sumFeaturesPerShard({
      x: { rows: 4, cols: 2, data: x },
      shardIds: ["a"],
      shardOffsets: Int32Array.of(0, 4),
    });
    expect(Array.from(sums[0])).toEqual([2]);
  });
});
