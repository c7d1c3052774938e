// The simulation's cost as the form shows it before a run: methods.md §7's formula on what the
// uploads' previews show. Outside checks: methods.md's worked example, and the engine's own exact
// cost after it has read the whole file (penguins from the `vega-datasets` npm package, BSD-3), and
// that file's own row count. The time hint's rates are measurements on this machine (their doc
// comments say which), so the hint's tests check its arithmetic, not the rates.
import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import { analyzePartition } from "@/lib/analysis";
import { estimateSimulationCost } from "@/lib/analysis/simulation/simulate-plan";
import { estimateEvaluationCost } from "@/lib/analysis/simulation/simulation-cost";
import {
  describeDuration,
  describeSimulationCost,
  estimateRowCount,
  estimateSimulationFromPreviews,
  findSimulationRefusal,
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

describe("the form's words when a simulation is above the budget", () => {
  const estimate = (participants: number | undefined, seeds: number) => {
    const dataset = previewOf(penguins.csv, "penguins.csv");
    const options = { labelColumn: "Species", idColumn: "row", shardColumn: "Island" };
    const found = estimateSimulationFromPreviews({
      dataset,
      options: { ...options, participants, localSteps: 10, rounds: 100, batchSize: 32 },
      seeds,
    });
    if (!found) throw new Error("no estimate");
    return found;
  };

  it("names the form's fields that would fit it, in the form's number format, never the budget", () => {
    // All 3 islands, S = 3: 3 × 11 × 100 · 3 · 10 · 32 · 8 · 3 = 7.6032e7 (methods.md §7, by hand).
    // Budget 5e7, share q = 0.6576: R ≤ ⌊65.8⌋ = 65, M ≤ ⌊1.97⌋ = 1, S ≤ ⌊11q − 8⌋ = ⌊−0.77⌋: none.
    expect(findSimulationRefusal(estimate(undefined, 3), 5e7)).toBe(
      "The simulation would take about 7.6×10⁷ multiply-adds, above the server's budget of " +
        "5.0×10⁷. It fits with Rounds (R) at most 65, or a sample of at most 1 shard per round (M) " +
        "instead of all shards.",
    );
    // M = 2 of a sample, S = 10: 3 × 18 × 100 · 2 · 10 · 32 · 8 · 3 = 8.2944e7; budget 7e7,
    // q = 0.8439: R ≤ 84, M ≤ ⌊1.69⌋ = 1, S ≤ ⌊18q − 8⌋ = ⌊7.19⌋ = 7.
    expect(findSimulationRefusal(estimate(2, 10), 7e7)).toBe(
      "The simulation would take about 8.3×10⁷ multiply-adds, above the server's budget of " +
        "7.0×10⁷. It fits with Rounds (R) at most 84, or Shards per round (M) at most 1, or " +
        "Seeds (S) at most 7.",
    );
    expect(findSimulationRefusal(estimate(2, 10), 1e5)).toBe(
      "The simulation would take about 8.3×10⁷ multiply-adds, above the server's budget of " +
        "100,000. No one change fits it: lower the rounds, shards per round, local steps and " +
        "batch size together.",
    );
    expect(findSimulationRefusal(estimate(2, 10), 8.2944e7)).toBeNull();
  });
});

describe("the simulation's time hint", () => {
  it("counts the full-data loss passes: the bench case's 3.84e10 on top of its steps", () => {
    // estimateEvaluationCost's doc example, by hand: R = 100 → 11 grid check points and 100 curve
    // points (round 0 included, capped at methods.md §7's 100); 3 × (8·11 + 3·100) = 1164 passes
    // of N·(d+1)·C = 100 000 · 33 · 10.
    expect(estimateEvaluationCost(100, 100_000, 33, 10, 3)).toBe(1164 * 3.3e7);
    // R = 5: 6 points each; 3 × (8·6 + 2·6) = 180 passes.
    expect(estimateEvaluationCost(5, 344, 8, 3, 2)).toBe(180 * 344 * 8 * 3);
    // Steps 3.4848e10 at 1e8/s (348 s) plus passes 3.8412e10 at 1e9/s (38 s): 386 s.
    expect(describeSimulationCost(3.4848e10, DEFAULT_SIMULATION_BUDGET, 3.8412e10).time).toBe(
      "about 6 minutes",
    );
    // A million rows under a small plan: the passes are nearly all of the work.
    const small = { participants: 10, localSteps: 1, rounds: 100, batchSize: 32 };
    const steps = estimateSimulationCost(small, 65, 10, 3);
    const passes = estimateEvaluationCost(100, 1_000_000, 65, 10, 3);
    expect(describeSimulationCost(steps, DEFAULT_SIMULATION_BUDGET).time).toBe("under a minute");
    expect(describeSimulationCost(steps, DEFAULT_SIMULATION_BUDGET, passes).time).toBe(
      "about 13 minutes",
    );
  });

  it("estimates penguins' 344 rows from its preview and its file size", () => {
    // The vega-datasets penguins file has 344 data rows; its preview keeps 20 of them.
    const bytes = new TextEncoder().encode(penguins.csv).length;
    const rows = estimateRowCount(previewOf(penguins.csv, "penguins.csv"), bytes);
    expect(rows).toBeGreaterThan(344 * 0.85);
    expect(rows).toBeLessThan(344 * 1.15);
  });
});
