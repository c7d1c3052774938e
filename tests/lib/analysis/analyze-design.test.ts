import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import { analyzePartition, type AnalysisProgress } from "@/lib/analysis";
import type { AnalysisOptionsInput } from "@/lib/validation/analysis-options";
import { loadPenguinsCsv } from "./support/open-data";

// The analysis after reading (lib/analysis/analyze-design.ts). What the progress bar shows (methods.md §1–§6 in order: read, encode, fit the
// reference model, measure at the path's points, advise), on the vega-datasets penguins split by
// island. The checks are the bar's contract, common practice for staged progress: the stages come
// once each and in that order, and within a stage the fraction never goes back and stays in [0, 1].
const STAGES = ["reading", "encoding", "fitting", "measuring", "advising"];

const OPTIONS = { labelColumn: "Species", shardColumn: "Island", idColumn: "row" };

function analyzePenguins(
  options: AnalysisOptionsInput,
  csv = loadPenguinsCsv().csv,
  onProgress: (progress: AnalysisProgress) => void = () => {},
) {
  return analyzePartition(
    {
      data: Readable.from([Buffer.from(csv, "utf8")]),
      dataName: "penguins.csv",
      options,
      threads: 1,
    },
    onProgress,
  );
}

async function progressOfPenguins(): Promise<AnalysisProgress[]> {
  const reports: AnalysisProgress[] = [];
  await analyzePenguins(OPTIONS, undefined, (progress) => reports.push({ ...progress }));
  return reports;
}

describe("an analysis's progress", () => {
  it("goes through the five stages once each, in order, each fraction in [0, 1] and never back", async () => {
    const reports = await progressOfPenguins();
    const order = reports.map((report) => report.stage).filter((s, k, all) => s !== all[k - 1]);
    expect(order).toEqual(STAGES);
    for (const stage of STAGES) {
      const fractions = reports.filter((r) => r.stage === stage).map((r) => r.fraction);
      for (const [k, fraction] of fractions.entries()) {
        expect(fraction, stage).toBeGreaterThanOrEqual(k === 0 ? 0 : fractions[k - 1]);
        expect(fraction, stage).toBeLessThanOrEqual(1);
      }
    }
  });

  it("starts encoding, fitting and measuring at 0 and ends them at 1, measuring step by step", async () => {
    const reports = await progressOfPenguins();
    for (const stage of ["encoding", "fitting", "measuring"]) {
      const fractions = reports.filter((r) => r.stage === stage).map((r) => r.fraction);
      expect([fractions[0], fractions.at(-1)], stage).toEqual([0, 1]);
    }
    // Measuring takes the reference point, then the path's points t·W (methods.md §5): each
    // finished point moves the bar, so it reports more than its start and end.
    const measuring = reports.filter((r) => r.stage === "measuring").map((r) => r.fraction);
    expect(new Set(measuring).size).toBeGreaterThan(3);
  });

  it("refuses one shard, and more participants per round than shards, naming what it expected", async () => {
    // The penguins of one island: heterogeneity between shards needs at least two.
    const [header, ...rows] = loadPenguinsCsv().csv.trimEnd().split("\n");
    const biscoe = [header, ...rows.filter((row) => row.includes(",Biscoe,"))].join("\n");
    await expect(analyzePenguins(OPTIONS, `${biscoe}\n`)).rejects.toThrow(
      /the partition has 1 shard \(expected at least two shards\)/,
    );
    // Three islands, four participants per round.
    await expect(analyzePenguins({ ...OPTIONS, participants: 4 })).rejects.toThrow(
      /option participants: .*is 4 participants per round \(expected at most the number of shards \(3\)\)/,
    );
  });
});
