import { describe, expect, it } from "vitest";
import { LOCAL_STEP_CHOICES } from "@/lib/analysis/advise-plan";
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

  it("finds the crossover K of a hand computation, and none behind the barrier", () => {
    // methods.md §5 by hand with H = B = M = b = 1 and R = 1: the shared noise term σ_b B/√(MKR)
    // cancels, so local < minibatch ⟺ 1/K + σ_b^{2/3}/K^{1/3} + ζ^{2/3} < 1. With σ² = 1.5³
    // (σ_b^{2/3} = 1.5) and ζ² = 0: K = 4 gives 0.25 + 1.5/∛4 = 1.195, K = 8 gives
    // 0.125 + 0.75 = 0.875, so the crossover is K = 8. ζ² = 1e-3 adds 0.1 (0.975 at K = 8, still
    // K = 8); ζ² = 1 adds 1, so no K crosses (the barrier ζ² ≥ H²B²/R).
    const hand = {
      smoothness: 1,
      distance: 1,
      sigma2: 1.5 ** 3,
      participants: 1,
      localSteps: 1,
      rounds: 1,
      batchSize: 1,
    };
    expect(computeBoundCurves({ ...hand, zeta2Max: 0 }).crossoverLocalSteps).toBe(8);
    expect(computeBoundCurves({ ...hand, zeta2Max: 1e-3 }).crossoverLocalSteps).toBe(8);
    expect(computeBoundCurves({ ...hand, zeta2Max: 1 }).crossoverLocalSteps).toBeNull();
    const atEight = computeBoundCurves({ ...hand, zeta2Max: 0 }).points.find(
      (point) => point.localSteps === 8,
    );
    // minibatch = 1/R + σ_b/√K = 1 + √3.375/√8; local adds 0.875 − 1 to it.
    expect(atEight?.minibatch).toBeCloseTo(1 + Math.sqrt(3.375 / 8), 14);
    expect(atEight?.local).toBeCloseTo(0.875 + Math.sqrt(3.375 / 8), 14);
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
