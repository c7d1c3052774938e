import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import type { PartitionSummary } from "@/lib/analysis";
import { analyzeText } from "./support/analyze-text";
import { loadPenguinsCsv, loadWineDirichletCsv } from "./support/open-data";
import { REFERENCE_PYTHON } from "./support/run-python";
import { execFileSync } from "node:child_process";

interface PointReference {
  loss: number;
  gradNorm: number;
  shardLoss: number[];
  shardGradients: number[][];
  shardSigma2: number[];
  sigma2: number;
  sigma2Pooled: number;
  zeta2: number;
  zeta2Uniform: number;
  dissimilarity: number;
}

interface Reference {
  features: string[];
  classes: string[];
  shardIds: string[];
  weights: number[];
  smoothness: number;
  optimum: PointReference;
  zero: PointReference;
  labelSkew: {
    tv: number[];
    hellinger: number[];
    js: number[];
    kl: number[];
    dirichletAlpha: number;
    weightedMean: Record<"tv" | "hellinger" | "js" | "kl", number>;
    max: Record<"tv" | "hellinger" | "js" | "kl", number>;
  };
  agreementAtZero: number[][];
}

const LAMBDA = 1e-3;

/**
 * Outside reference: tests/lib/analysis/support/reference_statistics.py — pandas preprocessing,
 * scikit-learn LogisticRegression(C = 1/(λN), solver='newton-cg', multinomial) for W*, NumPy with
 * explicit per-sample gradients for σ², SciPy for divergences and the Dirichlet-multinomial fit.
 */
function computeReference(csv: string, label: string, shard: string, id?: string): Reference {
  const directory = mkdtempSync(path.join(tmpdir(), "partita-reference-"));
  const file = path.join(directory, "data.csv");
  writeFileSync(file, csv);
  const script = path.join(import.meta.dirname, "support", "reference_statistics.py");
  const output = execFileSync(REFERENCE_PYTHON, [script], {
    input: JSON.stringify({ csv: file, label, shard, id, lam: LAMBDA }),
    encoding: "utf8",
  });
  return JSON.parse(output) as Reference;
}

function relativeError(actual: number, expected: number): number {
  return Math.abs(actual - expected) / Math.max(Math.abs(expected), 1e-300);
}

/**
 * W* is only defined to the optimizer tolerance ‖∇F‖ ≤ 1e-8·max(1, ‖∇F(0)‖) (methods.md §2); with
 * curvature as small as λ = 1e-3 that allows weight differences up to ~1e-5, so quantities at W*
 * are compared to 1e-5 relative, quantities at W = 0 (no optimizer involved) to 1e-11.
 */
function expectMatchesReference(
  summary: PartitionSummary,
  reference: Reference,
  atZero: PartitionSummary,
) {
  expect(summary.preprocessing.featureNames).toEqual(reference.features);
  expect(summary.dataset.classNames).toEqual(reference.classes);
  expect(summary.shards.map((shard) => shard.id)).toEqual(reference.shardIds);

  // methods.md §2 promises W* "to about 1e-8" of an outside solver. What both solvers control is
  // the gradient: the engine stops at ‖∇F(W*)‖ ≤ 1e-8·max(1, ‖∇F(0)‖) and scikit-learn's
  // newton-cg must itself meet 1e-8, so that is checked as promised. The weights follow from it only
  // up to the curvature: with F λ-strongly convex off the bias, ‖ΔW‖ ≲ (‖∇F‖ + ‖∇F_ref‖)/λ, about
  // 7e-6 here (λ = 1e-3; observed: 4.5e-7 on penguins, 1.5e-7 on wine), so 1e-8 on the weights
  // would need a gradient near 1e-11, past what the contract asks of the fit.
  expect(reference.optimum.gradNorm).toBeLessThan(1e-8);
  expect(summary.model.gradNorm).toBeLessThanOrEqual(1e-8 * Math.max(1, atZero.model.gradNorm));
  const weightBound = (summary.model.gradNorm + reference.optimum.gradNorm) / LAMBDA;
  const weights = summary.model.optimum.weights.flat();
  weights.forEach((value, k) =>
    expect(Math.abs(value - reference.weights[k])).toBeLessThan(weightBound),
  );
  expect(summary.model.optimizer.converged).toBe(true);
  expect(Math.abs(summary.model.loss - reference.optimum.loss)).toBeLessThan(1e-10);
  expect(relativeError(summary.heterogeneity.smoothness, reference.smoothness)).toBeLessThan(1e-10);

  summary.shards.forEach((shard, m) => {
    expect(relativeError(shard.loss, reference.optimum.shardLoss[m])).toBeLessThan(1e-5);
    const norm2 = reference.optimum.shardGradients[m].reduce((a, b) => a + b * b, 0);
    expect(relativeError(shard.gradNorm2, norm2)).toBeLessThan(1e-4);
    expect(relativeError(shard.sigma2, reference.optimum.shardSigma2[m])).toBeLessThan(1e-5);
    expect(shard.tv).toBeCloseTo(reference.labelSkew.tv[m], 13);
    expect(shard.hellinger).toBeCloseTo(reference.labelSkew.hellinger[m], 13);
    expect(shard.js).toBeCloseTo(reference.labelSkew.js[m], 13);
    expect(shard.kl).toBeCloseTo(reference.labelSkew.kl[m], 13);
  });
  const heterogeneity = summary.heterogeneity;
  expect(relativeError(heterogeneity.zeta2, reference.optimum.zeta2)).toBeLessThan(1e-5);
  expect(relativeError(heterogeneity.zeta2Uniform, reference.optimum.zeta2Uniform)).toBeLessThan(
    1e-5,
  );
  expect(relativeError(heterogeneity.sigma2, reference.optimum.sigma2)).toBeLessThan(1e-5);
  expect(relativeError(heterogeneity.sigma2Pooled, reference.optimum.sigma2Pooled)).toBeLessThan(
    1e-5,
  );
  // Report-level label skew: NumPy's size-weighted means and maxima of SciPy's divergences, on
  // shards of unequal size.
  expect(new Set(summary.shards.map((shard) => shard.rows)).size).toBeGreaterThan(1);
  for (const key of ["tv", "hellinger", "js", "kl"] as const) {
    expect(summary.labelSkew[key]).toBeCloseTo(reference.labelSkew.weightedMean[key], 13);
    expect(summary.labelSkew.max[key]).toBeCloseTo(reference.labelSkew.max[key], 13);
  }
  // Gradient agreement at W₀ = 0 on the same unequal shards: NumPy's cosines of its gradients.
  const agreement = summary.heterogeneity.gradientAgreement as number[][];
  expect(agreement).toHaveLength(reference.agreementAtZero.length);
  agreement.forEach((row, m) =>
    row.forEach((cosine, k) => expect(cosine).toBeCloseTo(reference.agreementAtZero[m][k], 11)),
  );
  // SciPy's bounded Brent search on log α vs the engine's grid + golden section: both to ~1e-6.
  expect(
    relativeError(summary.labelSkew.dirichletAlpha, reference.labelSkew.dirichletAlpha),
  ).toBeLessThan(1e-5);

  // At W = 0 nothing depends on the optimizer.
  const zero = reference.zero;
  expect(atZero.model.reference).toBe("zero");
  expect(relativeError(atZero.model.loss, zero.loss)).toBeLessThan(1e-12);
  expect(relativeError(atZero.model.gradNorm, zero.gradNorm)).toBeLessThan(1e-11);
  atZero.shards.forEach((shard, m) => {
    const norm2 = zero.shardGradients[m].reduce((a, b) => a + b * b, 0);
    expect(relativeError(shard.gradNorm2, norm2)).toBeLessThan(1e-11);
    expect(relativeError(shard.sigma2, zero.shardSigma2[m])).toBeLessThan(1e-11);
  });
  expect(relativeError(atZero.heterogeneity.zeta2, zero.zeta2)).toBeLessThan(1e-11);
  expect(relativeError(atZero.heterogeneity.zeta2Uniform, zero.zeta2Uniform)).toBeLessThan(1e-11);
  expect(relativeError(atZero.heterogeneity.sigma2, zero.sigma2)).toBeLessThan(1e-11);
  expect(relativeError(atZero.heterogeneity.sigma2Pooled, zero.sigma2Pooled)).toBeLessThan(1e-11);
  expect(
    relativeError(atZero.heterogeneity.dissimilarity as number, zero.dissimilarity),
  ).toBeLessThan(1e-11);
  expect(atZero.heterogeneity.path[0].zeta2).toBeCloseTo(atZero.heterogeneity.zeta2, 14);
}

describe("reference model and statistics against scikit-learn / NumPy / SciPy", () => {
  it("penguins (vega-datasets, BSD-3) partitioned by island through a partition map", async () => {
    const { csv, islandMap } = loadPenguinsCsv();
    const options = { labelColumn: "Species", idColumn: "row", lambda: LAMBDA };
    // The map's row_id values are the `row` id column. Island stays in the data, so the features are
    // named explicitly (the reference uses all columns but label, id and shard).
    const features = [
      "Beak Length (mm)",
      "Beak Depth (mm)",
      "Flipper Length (mm)",
      "Body Mass (g)",
      "Sex",
    ];
    const summary = await analyzeText(csv, { ...options, features }, islandMap);
    const atZero = await analyzeText(csv, { ...options, features, reference: "zero" }, islandMap);
    const reference = computeReference(csv, "Species", "Island", "row");
    expect(summary.dataset).toMatchObject({
      rows: 344,
      features: 7,
      classes: 3,
      task: "classification",
    });
    expectMatchesReference(summary, reference, atZero);
  });

  it("wine (scikit-learn load_wine) with a seeded Dirichlet(0.5) split into 6 shards", async () => {
    const csv = loadWineDirichletCsv(20240611, 0.5, 6);
    const options = { labelColumn: "cultivar", shardColumn: "shard", lambda: LAMBDA };
    const summary = await analyzeText(csv, options);
    const atZero = await analyzeText(csv, { ...options, reference: "zero" });
    const reference = computeReference(csv, "cultivar", "shard");
    expect(summary.dataset).toMatchObject({ rows: 178, features: 13, classes: 3 });
    expectMatchesReference(summary, reference, atZero);
  });
});
