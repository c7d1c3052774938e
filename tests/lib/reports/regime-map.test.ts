import { describe, expect, it } from "vitest";
import { classifyRegimeCell, computeRegimeMap } from "@/lib/reports/regime-map";
import { PENGUIN_PLAN } from "./support/penguin-plan";

function cell(map: ReturnType<typeof computeRegimeMap>, localSteps: number, rounds: number) {
  return map.log10Ratio[map.localSteps.indexOf(localSteps)][map.rounds.indexOf(rounds)];
}

describe("computeRegimeMap", () => {
  // Hand computation from the bounds of methods.md §5: H = B = 1, σ = ζ = 0, K = 10, R = 100 gives
  // minibatch H B²/R = 0.01 and local H B²/(KR) = 0.001, so ρ = 0.1 and log₁₀ ρ = −1.
  it("gives log₁₀ ρ = −1 for the hand-computed plan", () => {
    const map = computeRegimeMap({
      smoothness: 1,
      distance: 1,
      sigma2: 0,
      zeta2Max: 0,
      participants: 1,
      localSteps: 10,
      rounds: 100,
      batchSize: 1,
    });
    expect(cell(map, 10, 100)).toBeCloseTo(-1, 14);
  });

  it("gives every cell the hand-computed log₁₀ ρ, the plan's own K and R included", () => {
    // methods.md §5 by hand with H = B = 1, σ = 0: ρ = (1/(KR) + ζ^{2/3}/R^{2/3}) / (1/R)
    // = 1/K + ζ^{2/3}·∛R; K = 12, R = 150 join the axes as the plan's own.
    const plan = {
      smoothness: 1,
      distance: 1,
      sigma2: 0,
      participants: 4,
      localSteps: 12,
      rounds: 150,
      batchSize: 8,
    };
    for (const zeta2Max of [0, 1e-3]) {
      const map = computeRegimeMap({ ...plan, zeta2Max });
      expect(map.localSteps).toContain(12);
      expect(map.rounds).toContain(150);
      map.localSteps.forEach((k, row) =>
        map.rounds.forEach((r, column) =>
          expect(map.log10Ratio[row][column]).toBeCloseTo(
            Math.log10(1 / k + Math.cbrt(zeta2Max) * Math.cbrt(r)),
            12,
          ),
        ),
      );
    }
    const map = computeRegimeMap({ ...plan, zeta2Max: 0 });
    // ρ = 1/12 ≤ ½ → local updates; K = 1 gives ρ = 1 → no clear winner (methods.md §5 thresholds).
    expect(classifyRegimeCell(cell(map, 12, 150))).toBe("local-updates");
    expect(classifyRegimeCell(cell(map, 1, 150))).toBe("no-clear-winner");
    expect(classifyRegimeCell(Math.log10(2))).toBe("large-minibatch");
    expect(classifyRegimeCell(Math.log10(1.99))).toBe("no-clear-winner");
    expect(classifyRegimeCell(Math.log10(0.5))).toBe("local-updates");
  });

  // methods.md §5: "for large K and small ζ local SGD wins; for small K and large σ² minibatch wins".
  it("puts large K with small ζ² in local updates and small K with large σ² in large minibatches", () => {
    const calm = computeRegimeMap({ ...PENGUIN_PLAN, zeta2Max: 1e-6 });
    expect(classifyRegimeCell(cell(calm, 4096, 100))).toBe("local-updates");
    // Many participants shrink the shared σ_b B/√(MKR) term, leaving local SGD's own noise term.
    const noisy = computeRegimeMap({
      ...PENGUIN_PLAN,
      participants: 1000,
      sigma2: 1e4,
      zeta2Max: 1e-8,
    });
    expect(classifyRegimeCell(cell(noisy, 2, 100))).toBe("large-minibatch");
  });

  it("has no cell where local SGD wins once the heterogeneity barrier holds at every R", () => {
    // ζ² = 1e6 ≥ H²B²/R for every R ≥ 1 on the map (H²B² ≈ 117).
    const map = computeRegimeMap({ ...PENGUIN_PLAN, zeta2Max: 1e6 });
    const verdicts = map.log10Ratio.flat().map(classifyRegimeCell);
    expect(verdicts).not.toContain("local-updates");
  });

  it("marks cells where both bounds vanish as null and classifies them as no clear winner", () => {
    const map = computeRegimeMap({ ...PENGUIN_PLAN, distance: 0 });
    expect(map.log10Ratio.flat().every((value) => value === null)).toBe(true);
    expect(classifyRegimeCell(null)).toBe("no-clear-winner");
  });
});
