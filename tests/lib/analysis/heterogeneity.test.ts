import { describe, expect, it } from "vitest";
import {
  computeSmoothness,
  findNoiseCentres,
  measureAtPoint,
  measureGradientAgreement,
} from "@/lib/analysis/measure-heterogeneity";
import {
  accumulatePass,
  createTotals,
  createWorkspace,
  type PassData,
  type PassTotals,
} from "@/lib/analysis/objective-pass";
import { matrixFromValues } from "@/lib/math/matrix";
import { runPythonJson } from "./support/run-python";

function seededValues(count: number, seed: number): number[] {
  const values: number[] = [];
  let state = seed;
  for (let index = 0; index < count; index++) {
    state = (state * 1103515245 + 12345) % 2147483648;
    values.push(state / 2147483648 - 0.5);
  }
  return values;
}

const OFFSETS = [0, 7, 19, 30];
const ROWS = 30;
const WIDTH = 3;
const CLASSES = 3;
const LAMBDA = 0.1;
/** Rows of two features and the bias 1, three shards of 7, 12 and 11 rows. */
const X = seededValues(ROWS * 2, 5).flatMap((_, k, all) =>
  k % 2 === 0 ? [3 * all[k], 2 * all[k + 1] + 0.4, 1] : [],
);
const LABELS = Array.from({ length: ROWS }, (_, row) => (row * 7 + Math.floor(row / 11)) % CLASSES);
const TARGETS = seededValues(ROWS, 11).map((value, row) => 4 * value + X[row * WIDTH]);

/**
 * Outside reference: methods.md §2–§3 from per-sample gradients formed explicitly with NumPy
 * (softmax ∇ℓᵢ = (pᵢ − e_yᵢ) x̃ᵢᵀ with scipy.special.softmax; least squares rᵢ x̃ᵢ), shard by shard.
 */
const REFERENCE_PROGRAM = `import json,sys
import numpy as np
from scipy.special import softmax, logsumexp
d=json.load(sys.stdin)
X=np.array(d["x"]).reshape(-1,d["width"]); W=np.array(d["w"]).reshape(-1,d["width"]); lam=d["lam"]
off=d["offsets"]; N=len(X)
if d["labels"] is not None:
    y=np.array(d["labels"]); S=X@W.T; P=softmax(S,axis=1); E=np.eye(W.shape[0])[y]
    loss=logsumexp(S,axis=1)-S[np.arange(N),y]
    G=np.einsum("ic,ij->icj",P-E,X).reshape(N,-1)
else:
    r=X@W[0]-np.array(d["targets"]); loss=0.5*r*r; G=r[:,None]*X
Wnb=W.copy(); Wnb[:,-1]=0; reg=(Wnb**2).sum()*lam/2; regGrad=(lam*Wnb).ravel()
shards=[]
for m in range(len(off)-1):
    Gm=G[off[m]:off[m+1]]; g=Gm.mean(0)+regGrad
    shards.append({"loss":float(loss[off[m]:off[m+1]].mean()+reg),"gradient":g.tolist(),
      "gradNorm2":float(g@g),"sigma2":float(((Gm-Gm.mean(0))**2).sum(1).mean())})
w=np.diff(off)/N; g=np.array([s["gradient"] for s in shards]); gF=w@g; gbar=g.mean(0)
print(json.dumps({"loss":float(w@[s["loss"] for s in shards]),"gradient":gF.tolist(),
  "gradientNorm":float(np.linalg.norm(gF)),"shards":shards,
  "zeta2":float(w@((g-gF)**2).sum(1)),"zeta2Uniform":float(((g-gbar)**2).sum(1).mean()),
  "dissimilarity":float(np.sqrt(w@(g**2).sum(1))/np.linalg.norm(gF)),
  "sigma2":float(w@[s["sigma2"] for s in shards]),
  "sigma2Pooled":float(((G-G.mean(0))**2).sum(1).mean())}))`;

interface Reference {
  loss: number;
  gradient: number[];
  gradientNorm: number;
  shards: { loss: number; gradient: number[]; gradNorm2: number; sigma2: number }[];
  zeta2: number;
  zeta2Uniform: number;
  dissimilarity: number;
  sigma2: number;
  sigma2Pooled: number;
}

/** One pass per shard in this thread, as the pool's threads make them. */
function passPerShard(
  data: PassData,
  weights: Float64Array,
  centres: { shards: Float64Array[]; pooled: Float64Array } | null,
): PassTotals[] {
  return OFFSETS.slice(0, -1).map((start, m) => {
    const totals = createTotals(weights.length);
    accumulatePass(
      data,
      weights,
      start,
      OFFSETS[m + 1],
      totals,
      createWorkspace(weights.length / WIDTH, WIDTH),
      true,
      centres && { shard: centres.shards[m], pooled: centres.pooled },
    );
    return totals;
  });
}

function expectRelative(actual: number, expected: number, tolerance: number) {
  expect(Math.abs(actual - expected)).toBeLessThanOrEqual(tolerance * Math.abs(expected));
}

describe("measureAtPoint (methods.md §3) against per-sample gradients formed in NumPy", () => {
  const design = {
    x: { rows: ROWS, cols: WIDTH },
    shardIds: ["a", "b", "c"],
  };

  it.each([
    ["softmax", CLASSES],
    ["least squares", 1],
  ] as const)("gives F, ∇F, ζ², B, σ² and σ²_pooled, one pass and two (%s)", (_, weightRows) => {
    const data: PassData = {
      x: matrixFromValues(ROWS, WIDTH, X),
      labels: weightRows === 1 ? null : Int32Array.from(LABELS),
      targets: weightRows === 1 ? Float64Array.from(TARGETS) : null,
    };
    const weights = Float64Array.from(seededValues(weightRows * WIDTH, 3).map((v) => 2 * v));
    const reference = runPythonJson<Reference>(REFERENCE_PROGRAM, {
      x: X,
      width: WIDTH,
      w: Array.from(weights),
      lam: LAMBDA,
      offsets: OFFSETS,
      labels: data.labels && LABELS,
      targets: data.targets && TARGETS,
    });
    const onePass = passPerShard(data, weights, null);
    const pooled = createTotals(weights.length);
    accumulatePass(data, weights, 0, ROWS, pooled, createWorkspace(weightRows, WIDTH), true);
    const centres = findNoiseCentres({ shards: onePass, pooled });
    const twoPass = passPerShard(data, weights, centres);
    const options = { withNoise: true, vanishingGradient: 1e-12 };
    for (const [totals, extra] of [
      [onePass, {}],
      [twoPass, { centres }],
    ] as const) {
      const point = measureAtPoint(design, weights, LAMBDA, totals, { ...options, ...extra });
      expectRelative(point.loss, reference.loss, 1e-13);
      point.gradient.forEach((value, k) => expectRelative(value, reference.gradient[k], 1e-12));
      expectRelative(point.gradientNorm, reference.gradientNorm, 1e-12);
      point.shards.forEach((shard, m) => {
        const expected = reference.shards[m];
        expect(shard.rows).toBe(OFFSETS[m + 1] - OFFSETS[m]);
        expectRelative(shard.loss, expected.loss, 1e-13);
        shard.gradient.forEach((value, k) => expectRelative(value, expected.gradient[k], 1e-12));
        expectRelative(shard.gradNorm2, expected.gradNorm2, 1e-12);
        expectRelative(shard.sigma2, expected.sigma2, 1e-11);
      });
      expectRelative(point.zeta2, reference.zeta2, 1e-11);
      expectRelative(point.zeta2Uniform, reference.zeta2Uniform, 1e-11);
      expectRelative(point.dissimilarity ?? Number.NaN, reference.dissimilarity, 1e-12);
      expectRelative(point.sigma2, reference.sigma2, 1e-11);
      expectRelative(point.sigma2Pooled, reference.sigma2Pooled, 1e-11);
    }
    // The centres are the mean data gradients (methods.md §3's two-pass σₘ²): the shards' and all rows'.
    const dataGradient = (k: number, m: number) =>
      reference.shards[m].gradient[k] - (k % WIDTH === WIDTH - 1 ? 0 : LAMBDA * weights[k]);
    centres.shards.forEach((centre, m) =>
      centre.forEach((value, k) => expectRelative(value, dataGradient(k, m), 1e-12)),
    );
    centres.pooled.forEach((value, k) =>
      expectRelative(
        value,
        reference.gradient[k] - (k % WIDTH === WIDTH - 1 ? 0 : LAMBDA * weights[k]),
        1e-12,
      ),
    );

    // Without noise the σ's are NaN; at a gradient below the vanishing threshold B is undefined.
    const quiet = measureAtPoint(design, weights, LAMBDA, onePass, {
      withNoise: false,
      vanishingGradient: reference.gradientNorm * 1.01,
    });
    expect(quiet.sigma2).toBeNaN();
    expect(quiet.sigma2Pooled).toBeNaN();
    expect(quiet.shards.every((shard) => Number.isNaN(shard.sigma2))).toBe(true);
    expect(quiet.dissimilarity).toBeNull();
    // A gradient exactly at the optimizer's tolerance has converged (methods.md §2: ‖∇F‖ ≤ tolerance).
    const atTolerance = measureAtPoint(design, weights, LAMBDA, onePass, {
      withNoise: false,
      vanishingGradient: quiet.gradientNorm,
    });
    expect(atTolerance.dissimilarity).toBeNull();
    expect(
      measureAtPoint(design, weights, LAMBDA, onePass, {
        withNoise: false,
        vanishingGradient: reference.gradientNorm * 0.99,
      }).dissimilarity,
    ).not.toBeNull();
  });
});

describe("smoothness and gradient agreement", () => {
  it("takes H from NumPy's largest eigenvalue of G: λ_max/2 + λ for softmax, λ_max + λ for least squares (methods.md §3)", () => {
    const gram = [4, 1, 0.5, 1, 3, 0.2, 0.5, 0.2, 1];
    // Outside reference: numpy.linalg.eigvalsh.
    const top = runPythonJson<number>(
      `import json,sys
import numpy as np
print(json.dumps(float(np.linalg.eigvalsh(np.array(json.load(sys.stdin)).reshape(3,3))[-1])))`,
      gram,
    );
    const values = Float64Array.from(gram);
    expect(computeSmoothness(values, 3, "classification", 0.1)).toBeCloseTo(top / 2 + 0.1, 12);
    expect(computeSmoothness(values, 3, "regression", 0.1)).toBeCloseTo(top + 0.1, 12);
  });

  it("gives the cosine of every pair like scikit-learn's cosine_similarity, null beside a zero gradient", () => {
    const gradients = [
      [1, 2, -1],
      [0.5, -3, 2],
      [0, 0, 0],
      [-2, 1, 4],
    ];
    // Outside reference: sklearn.metrics.pairwise.cosine_similarity (which gives 0 for a zero vector,
    // where methods.md §3 leaves the cosine undefined: null).
    const reference = runPythonJson<number[][]>(
      `import json,sys
import numpy as np
from sklearn.metrics.pairwise import cosine_similarity
print(json.dumps(cosine_similarity(np.array(json.load(sys.stdin),float)).tolist()))`,
      gradients,
    );
    const agreement = measureGradientAgreement(gradients.map((g) => Float64Array.from(g)));
    agreement.forEach((row, m) =>
      row.forEach((value, k) => {
        if (m === 2 || k === 2) expect(value).toBeNull();
        else expect(value).toBeCloseTo(reference[m][k], 14);
      }),
    );
  });
});
