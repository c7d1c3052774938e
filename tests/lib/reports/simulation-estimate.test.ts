// The simulation's cost as the form shows it before a run: methods.md §7's formula on what the
// uploads' previews show. Outside checks: methods.md's worked example, and the engine's own exact
// cost after it has read the whole file (penguins from the `vega-datasets` npm package, BSD-3).
import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import { analyzePartition } from "@/lib/analysis";
import { estimateSimulationCost } from "@/lib/analysis/simulation/simulate-plan";
import {
  describeDuration,
  describeSimulationCost,
  estimateSimulationFromPreviews,
} from "@/lib/reports/simulation-estimate";
import { readCsvHead, summarizeCsvHead } from "@/lib/uploads/csv-preview";
import { DEFAULT_SIMULATION_BUDGET } from "@/lib/validation/analysis-options";
import { loadPenguinsCsv } from "@/tests/lib/analysis/support/open-data";

const penguins = loadPenguinsCsv();

function previewOf(text: string, name: string) {
  const bytes = new TextEncoder().encode(text);
  return summarizeCsvHead(readCsvHead({ bytes, totalBytes: bytes.length, fileName: name }));
}

const FEATURES = ["Beak Length (mm)", "Beak Depth (mm)", "Flipper Length (mm)", "Body Mass (g)"];
const PLAN = { localSteps: 10, rounds: 5, batchSize: 32 };

describe("the simulation's cost shown before a run", () => {
  it("reads methods.md §7's worked example as 3.5×10¹⁰ multiply-adds, about 6 minutes", () => {
    // methods.md §7 (and estimateSimulationCost's doc comment): M = 100, K = 10, R = 100, b = 32,
    // d + 1 = 33, C = 10, S = 3 → 3 × 11 × 100·100·10·32·33·10 = 3.4848e10.
    const plan = { participants: 100, localSteps: 10, rounds: 100, batchSize: 32 };
    const cost = estimateSimulationCost(plan, 33, 10, 3);
    expect(cost).toBe(3.4848e10);
    // 3.4848e10 at 1e8 multiply-adds a second is 348 s, 5.8 minutes.
    expect(describeSimulationCost(cost, DEFAULT_SIMULATION_BUDGET)).toEqual({
      amount: "3.5×10¹⁰",
      time: "about 6 minutes",
      overBudget: false,
    });
    expect(describeSimulationCost(cost, 1e10).overBudget).toBe(true);
    // Exactly at the budget is allowed, as checkSimulationBudget allows it.
    expect(describeSimulationCost(cost, cost).overBudget).toBe(false);
  });

  it("words durations from under a minute to hours", () => {
    expect(describeDuration(59)).toBe("under a minute");
    expect(describeDuration(70)).toBe("about a minute");
    expect(describeDuration(89 * 60)).toBe("about 89 minutes");
    expect(describeDuration(3 * 3600)).toBe("about 3 hours");
  });

  it("equals the engine's exact cost on penguins by island, from the previews alone", async () => {
    const dataset = previewOf(penguins.csv, "penguins.csv");
    const layout = previewOf(penguins.islandMap, "islands.csv");
    const options = { labelColumn: "Species", idColumn: "row", features: [...FEATURES, "Sex"] };
    const estimate = estimateSimulationFromPreviews({
      dataset,
      layout,
      options: { ...options, ...PLAN },
      seeds: 2,
    });
    // Four numbers, Sex's three levels (FEMALE, MALE, "."), the bias; three species; three islands.
    expect(estimate).toMatchObject({
      width: 8,
      weightRows: 3,
      plan: { participants: 3, ...PLAN },
      wholeFiles: true,
    });

    const summary = await analyzePartition({
      data: Readable.from([penguins.csv]),
      dataName: "penguins.csv",
      partition: Readable.from([penguins.islandMap]),
      partitionName: "islands.csv",
      options: { ...options, ...PLAN, simulate: { seeds: 2 } },
    });
    expect(estimate?.cost).toBe(summary.simulation?.cost);
  });

  it("follows a shard column, a sample of shards, regression and the default features", () => {
    const dataset = previewOf(penguins.csv, "penguins.csv");
    const byColumn = estimateSimulationFromPreviews({
      dataset,
      options: { labelColumn: "Species", idColumn: "row", shardColumn: "Island", ...PLAN },
      seeds: 3,
    });
    // Default features: all but label, id and shard — the four numbers and Sex.
    expect(byColumn).toMatchObject({ width: 8, weightRows: 3, plan: { participants: 3 } });

    const regression = estimateSimulationFromPreviews({
      dataset,
      options: {
        labelColumn: "Body Mass (g)",
        shardColumn: "Island",
        features: FEATURES.slice(0, 3),
        participants: 2,
        ...PLAN,
      },
      seeds: 3,
    });
    // Body mass has more than 20 distinct values: regression, one weight row (methods.md §1).
    expect(regression).toMatchObject({ width: 4, weightRows: 1, plan: { participants: 2 } });
  });

  it("gives nothing to show when the previews or the plan do not tell enough", () => {
    const dataset = previewOf(penguins.csv, "penguins.csv");
    const options = { labelColumn: "Species", shardColumn: "Island", ...PLAN };
    expect(estimateSimulationFromPreviews({ dataset: null, options, seeds: 3 })).toBeNull();
    expect(
      estimateSimulationFromPreviews({
        dataset,
        options: { ...options, labelColumn: "missing" },
        seeds: 3,
      }),
    ).toBeNull();
    expect(
      estimateSimulationFromPreviews({ dataset, options: { ...options, rounds: NaN }, seeds: 3 }),
    ).toBeNull();
    // A partition map without a preview: the shard count is unknown.
    expect(
      estimateSimulationFromPreviews({
        dataset,
        layout: null,
        options: { labelColumn: "Species", ...PLAN },
        seeds: 3,
      }),
    ).toBeNull();
  });
});
