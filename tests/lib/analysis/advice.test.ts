import { describe, expect, it } from "vitest";
import {
  advisePlan,
  computeBounds,
  decideVerdict,
  type BoundInputs,
} from "@/lib/analysis/advise-plan";
import { estimateDirichletAlpha } from "@/lib/analysis/measure-label-skew";
import { measureQuantitySkew } from "@/lib/analysis/measure-quantity-skew";
import { runPythonJson } from "./support/run-python";

const plan: BoundInputs = {
  smoothness: 2,
  distance: 3,
  sigma2: 0.5,
  zeta2Max: 0.1,
  participants: 8,
  localSteps: 10,
  rounds: 100,
  batchSize: 32,
};

describe("bound facts of methods.md §5 (Woodworth et al. 2020, from memory)", () => {
  it("minibatch SGD's bound does not change with heterogeneity; local SGD's grows with it", () => {
    const calm = computeBounds({ ...plan, zeta2Max: 0 });
    const stormy = computeBounds({ ...plan, zeta2Max: 50 });
    expect(stormy.minibatch).toBe(calm.minibatch);
    expect(stormy.acceleratedMinibatch).toBe(calm.acceleratedMinibatch);
    expect(stormy.local).toBeGreaterThan(calm.local);
  });

  it("with σ = 0 and ζ = 0 local SGD's bound is K times smaller (its first term)", () => {
    for (const localSteps of [1, 4, 64]) {
      const bounds = computeBounds({ ...plan, sigma2: 0, zeta2Max: 0, localSteps });
      expect(bounds.minibatch).toBeCloseTo(
        (plan.smoothness * plan.distance ** 2) / plan.rounds,
        14,
      );
      expect(bounds.local * localSteps).toBeCloseTo(bounds.minibatch, 14);
    }
  });

  it("evaluates the worked example H = B = 1, σ = ζ = 0, M = 1, K = 10, R = 100 by hand", () => {
    const bounds = computeBounds({
      ...plan,
      smoothness: 1,
      distance: 1,
      sigma2: 0,
      zeta2Max: 0,
      participants: 1,
    });
    expect(bounds.minibatch).toBeCloseTo(0.01, 15);
    expect(bounds.acceleratedMinibatch).toBeCloseTo(1e-4, 15);
    expect(bounds.local).toBeCloseTo(0.001, 15);
  });

  it("large K and small ζ favour local updates; small K and large σ² favour large minibatches", () => {
    const local = advisePlan({ ...plan, localSteps: 1024, sigma2: 0.01, zeta2Max: 1e-8 }, 1e-8);
    expect(local.verdict).toBe("local-updates");
    const minibatch = advisePlan(
      { ...plan, participants: 1000, localSteps: 2, sigma2: 1e4, zeta2Max: 1e-8 },
      1e-8,
    );
    expect(minibatch.verdict).toBe("large-minibatch");
  });

  it("flags the heterogeneity barrier ζ*² ≥ H²B²/R, where local SGD cannot beat minibatch SGD", () => {
    const threshold = (plan.smoothness ** 2 * plan.distance ** 2) / plan.rounds;
    expect(advisePlan({ ...plan, zeta2Max: threshold }, threshold).heterogeneityBarrier).toBe(true);
    expect(
      advisePlan({ ...plan, zeta2Max: threshold }, threshold * 0.99).heterogeneityBarrier,
    ).toBe(false);
    // Order-wise claim: with ζ²_max ≥ ζ*² ≥ H²B²/R, ρ ≥ 1 for every K and every noise level.
    for (const localSteps of [1, 8, 512, 4096]) {
      for (const sigma2 of [0, 1, 100]) {
        const advice = advisePlan({ ...plan, localSteps, sigma2, zeta2Max: threshold }, threshold);
        expect(advice.ratio as number).toBeGreaterThanOrEqual(1 - 1e-12);
        expect(advice.crossoverLocalSteps).toBeNull();
      }
    }
  });

  it("uses factor-of-two thresholds for the verdict and reports the crossover K and the regime map", () => {
    expect(decideVerdict(0.5)).toBe("local-updates");
    expect(decideVerdict(0.51)).toBe("no-clear-winner");
    expect(decideVerdict(2)).toBe("large-minibatch");
    expect(decideVerdict(null)).toBe("no-clear-winner");
    const advice = advisePlan({ ...plan, sigma2: 0, zeta2Max: 0 }, 0);
    expect(advice.crossoverLocalSteps).toBe(2); // K = 1 ties; K = 2 halves the only term.
    expect(advice.regimeMap.log10Ratio).toHaveLength(13);
    expect(advice.regimeMap.log10Ratio[3][0]).toBeCloseTo(-Math.log10(8), 12);
    expect(advice.caveats.length).toBeGreaterThan(0);
  });

  it("does not divide by zero when B = 0 (the optimum is the start)", () => {
    const advice = advisePlan({ ...plan, distance: 0 }, 0);
    expect(advice.ratio).toBeNull();
    expect(advice.verdict).toBe("no-clear-winner");
    expect(advice.heterogeneityBarrier).toBe(false);
  });
});

describe("Dirichlet α round trip on seeded synthetic splits", () => {
  it.each([0.3, 30])(
    "recovers α = %s within a factor of 1.5 (100 shards × 300 rows, 10 classes)",
    (alpha) => {
      // Outside generator: NumPy default_rng(seed) — qₘ ~ Dir(α p), countsₘ ~ Multinomial(300, qₘ).
      const counts = runPythonJson<number[][]>(
        `import json,sys
import numpy as np
alpha=json.load(sys.stdin); rng=np.random.default_rng(42)
p=rng.dirichlet([5.0]*10)
q=rng.dirichlet(alpha*p, size=100)
print(json.dumps([rng.multinomial(300,row).tolist() for row in q]))`,
        alpha,
      );
      const total = counts.flat().reduce((a, b) => a + b, 0);
      const pooled = counts[0].map((_, c) => counts.reduce((sum, row) => sum + row[c], 0) / total);
      const estimate = estimateDirichletAlpha(counts, pooled);
      expect(estimate / alpha).toBeGreaterThan(1 / 1.5);
      expect(estimate / alpha).toBeLessThan(1.5);
    },
  );

  it("drives α̂ to the lower end when every shard holds a single class", () => {
    const counts = [
      [50, 0, 0],
      [0, 50, 0],
      [0, 0, 50],
      [40, 0, 0],
    ];
    expect(estimateDirichletAlpha(counts, [90 / 190, 50 / 190, 50 / 190])).toBeLessThan(0.01);
  });
});

describe("quantity skew (hand-computed)", () => {
  it("gives Gini 0 for equal sizes and 0.75 with CV √3 for [0, 0, 0, 4]", () => {
    expect(measureQuantitySkew([5, 5, 5, 5])).toEqual({ gini: 0, cv: 0, min: 5, max: 5 });
    const skewed = measureQuantitySkew([4, 0, 0, 0]);
    expect(skewed.gini).toBeCloseTo(0.75, 15);
    expect(skewed.cv).toBeCloseTo(Math.sqrt(3), 15);
  });
});
