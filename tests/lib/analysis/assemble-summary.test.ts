import { describe, expect, it } from "vitest";
import type { Advice } from "@/lib/analysis/advise-plan";
import {
  assembleSummary,
  MAX_AGREEMENT_SHARDS,
  type SummaryParts,
} from "@/lib/analysis/assemble-summary";
import type { PointMeasurement } from "@/lib/analysis/measure-heterogeneity";
import { measureLabelSkew } from "@/lib/analysis/measure-label-skew";
import { measureQuantitySkew } from "@/lib/analysis/measure-quantity-skew";
import { PATH_POINTS } from "@/lib/analysis/path-points";
import { ENGINE_VERSION } from "@/lib/analysis/version";
import { runPythonJson } from "./support/run-python";

/** A measurement at one point whose every number tells where it came from (invented values). */
function point(tag: number, gradients: number[][]): PointMeasurement {
  return {
    loss: tag + 0.1,
    gradient: Float64Array.of(tag, -tag),
    gradientNorm: tag + 0.2,
    shards: gradients.map((gradient, m) => ({
      rows: 10 * (m + 1),
      loss: tag + 0.01 * (m + 1),
      gradient: Float64Array.from(gradient),
      gradNorm2: tag + 0.02 * (m + 1),
      sigma2: tag + 0.03 * (m + 1),
    })),
    zeta2: tag + 0.3,
    zeta2Uniform: tag + 0.4,
    dissimilarity: tag === 2 ? null : tag + 0.5,
    sigma2: tag + 0.6,
    sigma2Pooled: tag + 0.7,
  };
}

function makeParts(shardCount: number, classNames: string[] | null): SummaryParts {
  const counts = Array.from({ length: shardCount }, (_, m) => [m + 1, 3, (m * 7) % 5]);
  const gradients = Array.from({ length: shardCount }, (_, m) => [
    Math.cos(m),
    Math.sin(m),
    m === 1 ? 0 : 1,
  ]);
  gradients[shardCount - 1] = [0, 0, 0];
  return {
    rows: 1234,
    width: 6,
    task: classNames === null ? "regression" : "classification",
    classNames,
    shards: counts.map((_, m) => ({ id: `shard-${m}`, rows: 10 * (m + 1), featureShift: m / 10 })),
    labelSkew: measureLabelSkew(counts),
    quantitySkew: measureQuantitySkew(counts.map((row) => row[0] + row[1] + row[2])),
    atReference: point(9, gradients),
    // ζ² along the path rises, then falls: the largest is not the last.
    path: [0, 1, 2, 3, 4].map((t) =>
      point([5, 7, 2, 8, 6][t], t === 0 ? gradients : gradients.map((g) => g.map((v) => v + t))),
    ),
    smoothness: 0.25,
    advice: { verdict: "local-updates" } as Advice,
    model: {
      lambda: 1e-3,
      distance: 4.5,
      reference: "optimum",
      optimum: { classes: classNames, features: ["a"], weights: [[1, 2]] },
      optimizer: {
        converged: true,
        iterations: 3,
        evaluations: 4,
        gradNorm: 1e-9,
        tolerance: 1e-8,
      },
    },
    preprocessing: { featureNames: ["a"] } as SummaryParts["preprocessing"],
  };
}

describe("the machine-readable summary (methods.md §6)", () => {
  it("names and arranges every measured number under its §6 key", () => {
    const parts = makeParts(3, ["x", "y", "z"]);
    const summary = assembleSummary(parts);
    const { labelSkew, atReference } = parts;
    expect(summary.engineVersion).toBe(ENGINE_VERSION);
    // §6: features = d after encoding, bias excluded; classes null for regression.
    expect(summary.dataset).toEqual({
      rows: 1234,
      features: 5,
      classes: 3,
      task: "classification",
      classNames: ["x", "y", "z"],
    });
    expect(summary.shards).toEqual(
      parts.shards.map((shard, m) => ({
        id: shard.id,
        rows: shard.rows,
        tv: labelSkew.shards[m].tv,
        hellinger: labelSkew.shards[m].hellinger,
        js: labelSkew.shards[m].js,
        kl: labelSkew.shards[m].kl,
        gradNorm2: atReference.shards[m].gradNorm2,
        sigma2: atReference.shards[m].sigma2,
        loss: atReference.shards[m].loss,
        classesPresent: labelSkew.shards[m].classesPresent,
        effectiveClasses: labelSkew.shards[m].effectiveClasses,
        featureShift: shard.featureShift,
        labelCounts: labelSkew.shards[m].counts,
      })),
    );
    expect(summary.labelSkew).toEqual({
      tv: labelSkew.tv,
      hellinger: labelSkew.hellinger,
      js: labelSkew.js,
      kl: labelSkew.kl,
      dirichletAlpha: labelSkew.dirichletAlpha,
      max: labelSkew.max,
      categories: ["x", "y", "z"],
      pooled: labelSkew.pooled,
    });
    expect(summary.quantitySkew).toBe(parts.quantitySkew);
    // §6: model loss and gradNorm at the reference point.
    expect(summary.model).toEqual({ ...parts.model, loss: 9.1, gradNorm: 9.2 });
    expect(summary.advice).toBe(parts.advice);
    expect(summary.preprocessing).toBe(parts.preprocessing);
    const { gradientAgreement, ...heterogeneity } = summary.heterogeneity;
    // ζ²max the path's largest ζ², ζ*² the path end's; the rest at the reference point.
    expect(heterogeneity).toEqual({
      zeta2: 9.3,
      zeta2Uniform: 9.4,
      zeta2Max: 8.3,
      zeta2Star: 6.3,
      sigma2: 9.6,
      sigma2Pooled: 9.7,
      smoothness: 0.25,
      dissimilarity: 9.5,
      path: parts.path.map((measured, index) => ({
        t: PATH_POINTS[index],
        zeta2: measured.zeta2,
        dissimilarity: measured.dissimilarity,
        loss: measured.loss,
      })),
    });
    expect(heterogeneity.path.map((step) => step.t)).toEqual([0, 0.25, 0.5, 0.75, 1]);
    expect(heterogeneity.path[2].dissimilarity).toBeNull();
    // Outside reference: the cosine of every pair of shard gradients at W₀ = 0 (the path's start) in
    // NumPy, None where a gradient is zero.
    const reference = runPythonJson<(number | null)[][]>(
      `import sys, json
import numpy as np
G = np.array(json.load(sys.stdin)); n = np.linalg.norm(G, axis=1)
print(json.dumps([[float(a @ b / (n[i] * n[j])) if n[i] > 0 and n[j] > 0 else None
  for j, b in enumerate(G)] for i, a in enumerate(G)]))`,
      parts.path[0].shards.map((shard) => Array.from(shard.gradient)),
    );
    expect(gradientAgreement).toHaveLength(3);
    reference.forEach((row, m) =>
      row.forEach((cosine, k) =>
        cosine === null
          ? expect(gradientAgreement?.[m][k]).toBeNull()
          : expect(gradientAgreement?.[m][k]).toBeCloseTo(cosine, 14),
      ),
    );
  });

  it("names regression's decile bins and their label ranges, and leaves the ranges out when unknown", () => {
    const parts = makeParts(2, null);
    const summary = assembleSummary({
      ...parts,
      binRanges: [
        [0, 1],
        [1, 2],
        [2, 5],
      ],
    });
    expect(summary.dataset.classes).toBeNull();
    expect(summary.dataset.classNames).toBeNull();
    expect(summary.labelSkew.categories).toEqual(["decile bin 1", "decile bin 2", "decile bin 3"]);
    expect(summary.labelSkew.binRanges).toEqual([
      [0, 1],
      [1, 2],
      [2, 5],
    ]);
    expect(assembleSummary(parts).labelSkew).not.toHaveProperty("binRanges");
  });

  it("reports the agreement matrix up to 200 shards, and none beyond", () => {
    expect(MAX_AGREEMENT_SHARDS).toBe(200);
    const atLimit = assembleSummary(makeParts(200, ["x", "y", "z"]));
    expect(atLimit.heterogeneity.gradientAgreement).toHaveLength(200);
    expect(atLimit.heterogeneity.gradientAgreement?.[0][0]).toBeCloseTo(1, 15);
    const beyond = assembleSummary(makeParts(201, ["x", "y", "z"]));
    expect(beyond.heterogeneity.gradientAgreement).toBeNull();
    expect(beyond.shards).toHaveLength(201);
  });
});
