import { describe, expect, it } from "vitest";
import { evaluateObjective } from "@/lib/analysis/objective";
import { PassPool } from "@/lib/analysis/pass-pool";
import { analyzeText } from "./support/analyze-text";
import { designFromText } from "./support/design-from-text";
import { runPythonJson } from "./support/run-python";

/** A small seeded dataset (invented, for identities only): 3 numeric features, a category, 3 classes. */
function makeCsv(rows: number, seed: number, { regression = false } = {}): string {
  let state = seed;
  const random = () => {
    state = (state * 1103515245 + 12345) % 2147483648;
    return state / 2147483648;
  };
  const lines = ["a,b,c,colour,label,shard"];
  for (let i = 0; i < rows; i++) {
    const a = random() * 4 - 2;
    const b = random() * 10;
    const c = a * 0.5 + random();
    const colour = ["red", "green", "blue"][Math.floor(random() * 3)];
    const shard = `s${Math.floor(random() * 4)}`;
    const label = regression
      ? (2 * a - 0.3 * b + random()).toFixed(6)
      : ["x", "y", "z"][a + random() * 2 > 1 ? 0 : b > 5 ? 1 : 2];
    lines.push([a.toFixed(6), b.toFixed(6), c.toFixed(6), colour, label, shard].join(","));
  }
  return `${lines.join("\n")}\n`;
}

describe("identities of methods.md §2-§3", () => {
  it("F = Σ wₘ Fₘ: a pooled pass equals the size-weighted shard objectives", async () => {
    const design = await designFromText(makeCsv(500, 3), "label", "shard");
    const weights = Float64Array.from({ length: 3 * design.x.cols }, (_, k) => Math.sin(k));
    const pooled = evaluateObjective(design, weights, 0.01);
    let weighted = 0;
    for (let m = 0; m < design.shardIds.length; m++) {
      const rowStart = design.shardOffsets[m];
      const rowEnd = design.shardOffsets[m + 1];
      const shard = evaluateObjective(design, weights, 0.01, { rowStart, rowEnd });
      weighted += ((rowEnd - rowStart) / design.x.rows) * shard.value;
    }
    expect(Math.abs(pooled.value - weighted)).toBeLessThan(1e-13 * pooled.value);
  });

  it("σ²_pooled = σ² + ζ² (law of total variance) at zero, at the optimum and at given weights", async () => {
    const csv = makeCsv(400, 5);
    const optimum = await analyzeText(csv, { labelColumn: "label", shardColumn: "shard" });
    const given = {
      classes: optimum.model.optimum.classes,
      features: optimum.model.optimum.features,
      weights: optimum.model.optimum.weights.map((row) =>
        row.map((value, j) => value * 0.3 + j * 0.1),
      ),
    };
    for (const reference of ["optimum", "zero", given] as const) {
      const summary = await analyzeText(csv, {
        labelColumn: "label",
        shardColumn: "shard",
        reference,
      });
      const { sigma2Pooled, sigma2, zeta2 } = summary.heterogeneity;
      expect(Math.abs(sigma2Pooled - (sigma2 + zeta2))).toBeLessThan(1e-12 * sigma2Pooled);
    }
  });

  it("a split that copies one dataset into every shard has ζ² = 0 everywhere and α̂ at the upper end", async () => {
    const base = makeCsv(120, 11).trim().split("\n");
    const lines = [base[0]];
    for (const shard of ["p", "q", "r", "s"]) {
      for (const line of base.slice(1)) lines.push(line.replace(/,s\d$/, `,${shard}`));
    }
    const summary = await analyzeText(`${lines.join("\n")}\n`, {
      labelColumn: "label",
      shardColumn: "shard",
    });
    expect(summary.heterogeneity.zeta2Max).toBeLessThan(1e-28);
    expect(summary.heterogeneity.zeta2Uniform).toBeLessThan(1e-28);
    expect(summary.labelSkew.tv).toBe(0);
    // Upper end of the search range [1e-3, 1e6] (methods.md §4), to the search's 1e-6 precision.
    expect(summary.labelSkew.dirichletAlpha).toBeGreaterThan(1e6 * (1 - 1e-5));
    // B(W) = 1 exactly when every shard gradient equals ∇F (Li et al. 2020, Definition 3).
    expect(summary.heterogeneity.path[0].dissimilarity).toBeCloseTo(1, 12);
    // Gradient agreement: identical shards have cosine 1.
    summary.heterogeneity.gradientAgreement
      ?.flat()
      .forEach((cosine) => expect(cosine).toBeCloseTo(1, 12));
  });

  it.each([
    ["softmax", false],
    ["least squares", true],
  ])(
    "the %s gradient matches central finite differences (bias unpenalized)",
    async (_, regression) => {
      const design = await designFromText(makeCsv(200, 7, { regression }), "label", "shard");
      const lambda = 0.05;
      const rows = design.classes === null ? 1 : design.classes.length;
      const weights = Float64Array.from(
        { length: rows * design.x.cols },
        (_, k) => 0.3 * Math.cos(3 * k),
      );
      const analytic = evaluateObjective(design, weights, lambda).gradient;
      const step = 1e-6;
      for (let k = 0; k < weights.length; k++) {
        const plus = Float64Array.from(weights);
        const minus = Float64Array.from(weights);
        plus[k] += step;
        minus[k] -= step;
        const numeric =
          (evaluateObjective(design, plus, lambda).value -
            evaluateObjective(design, minus, lambda).value) /
          (2 * step);
        // Central differences: truncation O(h²) plus rounding ~ε·F/h ≈ 1e-10.
        expect(Math.abs(analytic[k] - numeric)).toBeLessThan(1e-8);
      }
    },
  );

  it("the softmax Hessian matches central differences of the gradient", async () => {
    const design = await designFromText(makeCsv(200, 13), "label", "shard");
    const lambda = 0.05;
    const size = 3 * design.x.cols;
    const weights = Float64Array.from({ length: size }, (_, k) => 0.4 * Math.sin(2 * k + 1));
    const passes = new PassPool(1).share(design, design.shardOffsets);
    const hessian = passes.computeSoftmaxHessian(weights, lambda);
    const step = 1e-5;
    for (let k = 0; k < size; k++) {
      const plus = Float64Array.from(weights);
      const minus = Float64Array.from(weights);
      plus[k] += step;
      minus[k] -= step;
      const gradientPlus = evaluateObjective(design, plus, lambda).gradient;
      const gradientMinus = evaluateObjective(design, minus, lambda).gradient;
      for (let j = 0; j < size; j++) {
        const numeric = (gradientPlus[j] - gradientMinus[j]) / (2 * step);
        // Central differences: truncation O(h²) ≈ 1e-10 plus rounding ~ε/h ≈ 1e-11.
        expect(Math.abs(hessian[j * size + k] - numeric)).toBeLessThan(1e-8);
      }
    }
  });

  it("the softmax Hessian at W = 0 is (I/C − 11ᵀ/C²) ⊗ X̃ᵀX̃/N + λ off the biases (uniform pᵢ)", async () => {
    const design = await designFromText(makeCsv(150, 17), "label", "shard");
    const width = design.x.cols;
    const size = 3 * width;
    const lambda = 0.01;
    const passes = new PassPool(1).share(design, design.shardOffsets);
    const hessian = passes.computeSoftmaxHessian(new Float64Array(size), lambda);
    const gram = passes.computeGram();
    for (let a = 0; a < 3; a++) {
      for (let b = 0; b < 3; b++) {
        for (let j = 0; j < width; j++) {
          for (let k = 0; k < width; k++) {
            const penalty = a === b && j === k && j !== width - 1 ? lambda : 0;
            const expected = ((a === b ? 1 / 3 : 0) - 1 / 9) * gram[j * width + k] + penalty;
            expect(hessian[(a * width + j) * size + b * width + k]).toBeCloseTo(expected, 14);
          }
        }
      }
    }
  });
});

describe("least squares against scikit-learn's Ridge (diabetes data bundled with scikit-learn)", () => {
  it("matches W*, F, σ² and H with Ridge(alpha = λN) on the standardized data", async () => {
    const lambda = 1e-3;
    // Outside reference: sklearn.datasets.load_diabetes (442 rows, 10 features, continuous target),
    // seeded shards from NumPy default_rng(7); Ridge for W*; NumPy per-sample gradients for σ².
    const reference = runPythonJson<{
      csv: string;
      weights: number[];
      loss: number;
      sigma2: number;
      sigma2Pooled: number;
      zeta2: number;
      smoothness: number;
    }>(
      `import json,sys,io
import numpy as np
from sklearn.datasets import load_diabetes
from sklearn.linear_model import Ridge
lam=${lambda}
data=load_diabetes(as_frame=True); frame=data.frame
frame["shard"]=["g"+str(v) for v in np.random.default_rng(7).integers(0,5,len(frame))]
out=io.StringIO(); frame.to_csv(out,index=False,float_format="%.17g")
X=frame.drop(columns=["target","shard"]).to_numpy(float); X=(X-X.mean(0))/X.std(0)
y=frame["target"].to_numpy(float); y=(y-y.mean())/y.std()
n=len(y); model=Ridge(alpha=lam*n,fit_intercept=True,solver="cholesky",tol=1e-14).fit(X,y)
w=np.append(model.coef_,model.intercept_); Xt=np.hstack([X,np.ones((n,1))])
r=Xt@w-y; per=r[:,None]*Xt
def noise(rows): g=per[rows]; return float(np.mean(np.sum((g-g.mean(0))**2,axis=1)))
shards=frame["shard"].to_numpy(); ids=sorted(set(shards))
wts=np.array([np.mean(shards==s) for s in ids])
reg=np.append(lam*w[:-1],0.0)
gm=np.array([per[shards==s].mean(0)+reg for s in ids]); g=per.mean(0)+reg
print(json.dumps({"csv":out.getvalue(),"weights":w.tolist(),"loss":float(0.5*np.mean(r**2)+0.5*lam*np.sum(w[:-1]**2)),
 "sigma2":float(sum(wt*noise(shards==s) for wt,s in zip(wts,ids))),"sigma2Pooled":noise(np.arange(n)),
 "zeta2":float(np.sum(wts*np.sum((gm-g)**2,axis=1))),
 "smoothness":float(np.linalg.eigvalsh(Xt.T@Xt/n)[-1]+lam)}))`,
    );
    const summary = await analyzeText(reference.csv, {
      labelColumn: "target",
      shardColumn: "shard",
      lambda,
    });
    expect(summary.dataset).toMatchObject({ task: "regression", classes: null, features: 10 });
    summary.model.optimum.weights[0].forEach((value, k) =>
      expect(value).toBeCloseTo(reference.weights[k], 9),
    );
    expect(summary.model.loss).toBeCloseTo(reference.loss, 12);
    expect(summary.heterogeneity.sigma2).toBeCloseTo(reference.sigma2, 10);
    expect(summary.heterogeneity.sigma2Pooled).toBeCloseTo(reference.sigma2Pooled, 10);
    expect(summary.heterogeneity.zeta2).toBeCloseTo(reference.zeta2, 12);
    expect(summary.heterogeneity.smoothness).toBeCloseTo(reference.smoothness, 10);
    expect(summary.labelSkew.categories).toHaveLength(10);
  });
});
