import { describe, expect, it } from "vitest";
import { advisePlan } from "@/lib/analysis/advise-plan";
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

  it("agrees with the engine's stored grid and gives the plan a cell equal to its ρ", () => {
    const inputs = { ...PENGUIN_PLAN, localSteps: 12, rounds: 150 };
    const advice = advisePlan(inputs, 0.5);
    const map = computeRegimeMap(inputs);
    expect(map.localSteps).toContain(12);
    expect(map.rounds).toContain(150);
    advice.regimeMap.localSteps.forEach((k, row) =>
      advice.regimeMap.rounds.forEach((r, column) => {
        expect(cell(map, k, r)).toBeCloseTo(advice.regimeMap.log10Ratio[row][column] as number, 12);
      }),
    );
    expect(cell(map, 12, 150)).toBeCloseTo(Math.log10(advice.ratio as number), 12);
    expect(classifyRegimeCell(cell(map, 12, 150))).toBe(advice.verdict);
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
