import { beforeAll, describe, expect, it } from "vitest";
import { advisePlan } from "@/lib/analysis/advise-plan";
import type { PartitionSummary } from "@/lib/analysis/summary";
import { computeBoundCurves, readBoundInputs } from "@/lib/reports/bound-curves";
import { classifyRegimeCell, computeRegimeMap } from "@/lib/reports/regime-map";
import { analyzePenguinsWithCli } from "@/tests/support/report-fixtures";

/**
 * The report page redraws the bounds from the constants a summary stores. On real CLI output
 * (penguins from vega-datasets, BSD-3, shards = island) the redrawn figures must agree with the
 * advice the engine itself wrote, for the default plan and for one with a local-updates verdict.
 */
describe.each([
  ["the default plan", [] as string[]],
  ["K = 1024, R = 10", ["--local-steps", "1024", "--rounds", "10"]],
])("report figures from the CLI's summary (%s)", (_, flags) => {
  let summary: PartitionSummary;
  beforeAll(async () => {
    summary = await analyzePenguinsWithCli(flags);
  });

  it("reads back the engine's bound inputs: same bounds, ρ, verdict and crossover", () => {
    const advice = advisePlan(readBoundInputs(summary), summary.heterogeneity.zeta2Star);
    expect(advice.ratio).toBe(summary.advice.ratio);
    expect(advice.local).toBe(summary.advice.local);
    expect(advice.verdict).toBe(summary.advice.verdict);
    expect(advice.heterogeneityBarrier).toBe(summary.advice.heterogeneityBarrier);
    expect(computeBoundCurves(readBoundInputs(summary)).crossoverLocalSteps).toBe(
      summary.advice.crossoverLocalSteps,
    );
  });

  it("draws the stored regime map, with the plan's cell at the report's ρ and verdict", () => {
    const map = computeRegimeMap(readBoundInputs(summary));
    const stored = summary.advice.regimeMap;
    stored.localSteps.forEach((k, row) =>
      stored.rounds.forEach((r, column) => {
        const cell = map.log10Ratio[map.localSteps.indexOf(k)][map.rounds.indexOf(r)];
        expect(cell).toBeCloseTo(stored.log10Ratio[row][column] as number, 12);
      }),
    );
    const planCell =
      map.log10Ratio[map.localSteps.indexOf(summary.advice.localSteps)][
        map.rounds.indexOf(summary.advice.rounds)
      ];
    expect(planCell).toBeCloseTo(Math.log10(summary.advice.ratio as number), 12);
    expect(classifyRegimeCell(planCell)).toBe(summary.advice.verdict);
  });
});
