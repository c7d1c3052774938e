import { beforeAll, describe, expect, it } from "vitest";
import type { PartitionSummary } from "@/lib/analysis/summary";
import { computeBoundCurves, readBoundInputs } from "@/lib/reports/bound-curves";
import { classifyRegimeCell, computeRegimeMap } from "@/lib/reports/regime-map";
import { analyzePenguinsWithCli } from "@/tests/support/report-fixtures";

/**
 * methods.md §5's bounds written out here, apart from the engine's code, from the constants a
 * summary stores: H, B, σ², ζ²max and the plan M, K, R, b (σ_b² = σ²/b).
 */
function boundsByHand(summary: PartitionSummary, localSteps: number, rounds: number) {
  const h = summary.heterogeneity.smoothness;
  const b = summary.model.distance;
  const noise = Math.sqrt(summary.heterogeneity.sigma2 / summary.advice.batchSize);
  const shared = (noise * b) / Math.sqrt(summary.advice.participants * localSteps * rounds);
  const minibatch = (h * b ** 2) / rounds + shared;
  const local =
    (h * b ** 2) / (localSteps * rounds) +
    shared +
    (h * noise ** 2 * b ** 4) ** (1 / 3) / (localSteps ** (1 / 3) * rounds ** (2 / 3)) +
    (h * summary.heterogeneity.zeta2Max * b ** 4) ** (1 / 3) / rounds ** (2 / 3);
  return { minibatch, local, ratio: local / minibatch };
}

/** methods.md §5's thresholds: ρ ≤ ½ local updates, ρ ≥ 2 large minibatches. */
function verdictByHand(ratio: number) {
  if (ratio <= 0.5) return "local-updates";
  if (ratio >= 2) return "large-minibatch";
  return "no-clear-winner";
}

/**
 * The report page redraws the bounds from the constants a summary stores. On real CLI output
 * (penguins from vega-datasets, BSD-3, shards = island) the redrawn figures and the engine's own
 * advice must both match the formulas of methods.md §5 evaluated here, for the default plan and
 * for one with a local-updates verdict.
 */
describe.each([
  ["the default plan", [] as string[], "no-clear-winner"],
  ["K = 1024, R = 10", ["--local-steps", "1024", "--rounds", "10"], "local-updates"],
])("report figures from the CLI's summary (%s)", (_, flags, verdict) => {
  let summary: PartitionSummary;
  beforeAll(async () => {
    summary = await analyzePenguinsWithCli(flags);
  });

  it("stores bounds, ρ and verdict that the formulas give, and the curves redraw them", () => {
    const { localSteps, rounds } = summary.advice;
    const hand = boundsByHand(summary, localSteps, rounds);
    expect(summary.advice.minibatch).toBeCloseTo(hand.minibatch, 12);
    expect(summary.advice.local).toBeCloseTo(hand.local, 12);
    expect(summary.advice.ratio as number).toBeCloseTo(hand.ratio, 12);
    expect(summary.advice.verdict).toBe(verdictByHand(hand.ratio));
    expect(summary.advice.verdict).toBe(verdict);
    const curves = computeBoundCurves(readBoundInputs(summary));
    const atPlan = curves.points.find((point) => point.localSteps === localSteps);
    expect(atPlan?.minibatch).toBeCloseTo(hand.minibatch, 12);
    expect(atPlan?.local).toBeCloseTo(hand.local, 12);
    // The crossover: the smallest power of two K ≤ 4096 where local < minibatch, by hand.
    const crossover =
      Array.from({ length: 13 }, (_, i) => 2 ** i).find(
        (k) => boundsByHand(summary, k, rounds).ratio < 1,
      ) ?? null;
    expect(curves.crossoverLocalSteps).toBe(crossover);
    expect(summary.advice.crossoverLocalSteps).toBe(crossover);
  });

  it("draws the regime map's cells at the formulas' log₁₀ ρ, the plan's cell at its verdict", () => {
    const map = computeRegimeMap(readBoundInputs(summary));
    const stored = summary.advice.regimeMap;
    stored.localSteps.forEach((k, row) =>
      stored.rounds.forEach((r, column) => {
        const expected = Math.log10(boundsByHand(summary, k, r).ratio);
        expect(stored.log10Ratio[row][column] as number).toBeCloseTo(expected, 10);
        const cell = map.log10Ratio[map.localSteps.indexOf(k)][map.rounds.indexOf(r)];
        expect(cell as number).toBeCloseTo(expected, 10);
      }),
    );
    const planCell =
      map.log10Ratio[map.localSteps.indexOf(summary.advice.localSteps)][
        map.rounds.indexOf(summary.advice.rounds)
      ];
    expect(classifyRegimeCell(planCell)).toBe(verdict);
  });
});
