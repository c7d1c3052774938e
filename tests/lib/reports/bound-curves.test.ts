import { describe, expect, it } from "vitest";
import { advisePlan, LOCAL_STEP_CHOICES } from "@/lib/analysis/advise-plan";
import { computeBoundCurves } from "@/lib/reports/bound-curves";
import { PENGUIN_PLAN } from "./support/penguin-plan";

describe("computeBoundCurves", () => {
  it("covers K = 1, 2, 4, …, 4096 and the plan's own K, in order", () => {
    const { points } = computeBoundCurves(PENGUIN_PLAN);
    expect(points.map((point) => point.localSteps)).toEqual(
      [...LOCAL_STEP_CHOICES, 10].sort((a, b) => a - b),
    );
  });

  // methods.md §5: "minibatch SGD's bound does not change with heterogeneity".
  it("leaves the minibatch curves unchanged when ζ² changes", () => {
    const calm = computeBoundCurves({ ...PENGUIN_PLAN, zeta2Max: 0 });
    const wild = computeBoundCurves({ ...PENGUIN_PLAN, zeta2Max: 1e4 });
    expect(wild.points.map((p) => p.minibatch)).toEqual(calm.points.map((p) => p.minibatch));
    expect(wild.points.map((p) => p.acceleratedMinibatch)).toEqual(
      calm.points.map((p) => p.acceleratedMinibatch),
    );
    expect(wild.points.every((p, i) => p.local > calm.points[i].local)).toBe(true);
  });

  // methods.md §5: "with σ = 0 and ζ = 0 local SGD's bound is K times smaller in its first term";
  // with no noise and no heterogeneity that term is all there is, so local = minibatch / K.
  it("makes local SGD K times better than minibatch SGD without noise or heterogeneity", () => {
    const { points } = computeBoundCurves({ ...PENGUIN_PLAN, sigma2: 0, zeta2Max: 0 });
    for (const point of points) {
      expect(point.local).toBeCloseTo(point.minibatch / point.localSteps, 15);
    }
  });

  it("finds the same crossover K as the engine's advice, for calm and heterogeneous splits", () => {
    for (const zeta2Max of [0, 1e-4, 0.77, 50, 1e4]) {
      for (const sigma2 of [0, 0.009, 30]) {
        const inputs = { ...PENGUIN_PLAN, zeta2Max, sigma2 };
        const advice = advisePlan(inputs, zeta2Max);
        expect(computeBoundCurves(inputs).crossoverLocalSteps).toBe(advice.crossoverLocalSteps);
      }
    }
  });

  it("reports a crossover for a calm split and none behind the heterogeneity barrier", () => {
    // Calm: ζ² = 0 and little noise, so enough local steps always win (methods.md §5).
    expect(computeBoundCurves({ ...PENGUIN_PLAN, zeta2Max: 0 }).crossoverLocalSteps).not.toBeNull();
    // ζ² term (H ζ² B⁴)^{1/3}/R^{2/3} alone exceeds minibatch's H B²/R when ζ² ≫ H²B²/R.
    expect(computeBoundCurves({ ...PENGUIN_PLAN, zeta2Max: 1e4 }).crossoverLocalSteps).toBeNull();
  });

  it("marks curves that a log scale cannot draw", () => {
    expect(computeBoundCurves(PENGUIN_PLAN).drawable).toBe(true);
    expect(computeBoundCurves({ ...PENGUIN_PLAN, distance: 0 }).drawable).toBe(false);
    expect(computeBoundCurves({ ...PENGUIN_PLAN, sigma2: Number.NaN }).drawable).toBe(false);
  });
});
