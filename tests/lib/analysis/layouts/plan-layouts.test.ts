import { Readable } from "node:stream";
import { beforeAll, describe, expect, it } from "vitest";
import {
  analyzePartition,
  AnalysisInputError,
  planLayouts,
  writeLayoutMap,
  type LayoutPlanInput,
  type LayoutPlanResult,
} from "@/lib/analysis";
import { loadPenguinsCsv } from "../support/open-data";

/**
 * The penguins of the vega-datasets package (Palmer penguins, Gorman, Williams & Fraser 2014) with
 * a `site` group column: island × sex, missing sex as "unknown".
 */
function penguinsWithSites(): string {
  const lines = loadPenguinsCsv().csv.trim().split("\n");
  return `${[
    `${lines[0]},site`,
    ...lines.slice(1).map((line) => {
      const fields = line.split(",");
      return `${line},${fields[2]}-${fields[7] || "unknown"}`;
    }),
  ].join("\n")}\n`;
}

const csv = penguinsWithSites();
const options = { labelColumn: "Species", idColumn: "row", lambda: 1e-3 } as const;

function plan(overrides: Partial<LayoutPlanInput> = {}): Promise<LayoutPlanResult> {
  return planLayouts({
    data: Readable.from([csv]),
    dataName: "penguins.csv",
    options,
    groupColumn: "site",
    shardCount: 3,
    threads: 1,
    ...overrides,
  });
}

describe("planLayouts on penguins with sites", () => {
  let result: LayoutPlanResult;
  beforeAll(async () => {
    result = await plan();
  }, 120_000);

  it("runs the default candidates, with group-hash and group-balanced for a group column", () => {
    const names = result.comparison.layouts.map((layout) => layout.name).sort();
    expect(names).toEqual(
      [
        "classes-2",
        "clusters",
        "dirichlet-0.5",
        "dirichlet-5",
        "dirichlet-50",
        "group-balanced",
        "group-hash",
        "iid",
        "quantity-0.5",
        "stratified",
      ].sort(),
    );
    expect(result.comparison.failures).toEqual([]);
    for (const layout of result.comparison.layouts) expect(layout.seed).toBe(1);
  });

  it("ranks by ρ, then by weighted JS (methods.md §8)", () => {
    const keys = result.comparison.layouts.map((layout) => [
      layout.summary.advice.ratio as number,
      layout.summary.labelSkew.js,
    ]);
    for (let k = 1; k < keys.length; k++) {
      const [ratio, js] = keys[k];
      const [previousRatio, previousJs] = keys[k - 1];
      expect(ratio > previousRatio || (ratio === previousRatio && js >= previousJs)).toBe(true);
    }
  });

  // The contract's read-back: the analysis given a candidate's exported map (and the same options)
  // reaches the summary the planner reported, exactly — same rows per shard, same encoding.
  it("every exported map read back by the analysis gives the summary in the comparison", async () => {
    for (const layout of result.comparison.layouts) {
      const map = writeLayoutMap(
        result.rowIds,
        result.assignments.get(layout.name) as Int32Array,
        3,
      );
      expect(map.startsWith("row_id,shard\n0,s")).toBe(true);
      const summary = await analyzePartition({
        data: Readable.from([csv]),
        dataName: "penguins.csv",
        partition: Readable.from([map]),
        options,
        threads: 1,
      });
      expect(summary, layout.name).toEqual(layout.summary);
    }
  }, 120_000);

  it("keeps every site in one shard under group-hash and group-balanced", () => {
    const sites = csv
      .trim()
      .split("\n")
      .slice(1)
      .map((line) => line.split(",").at(-1) as string);
    for (const name of ["group-hash", "group-balanced"]) {
      const assignment = result.assignments.get(name) as Int32Array;
      const shardOfSite = new Map<string, number>();
      sites.forEach((site, row) => {
        expect(shardOfSite.get(site) ?? assignment[row]).toBe(assignment[row]);
        shardOfSite.set(site, assignment[row]);
      });
    }
  });
});

describe("planLayouts input checks", () => {
  it("refuses more shards than rows, or than groups for the group generators", async () => {
    await expect(plan({ shardCount: 400, specs: [{ generator: "iid" }] })).rejects.toThrow(
      /400 shards for 344 kept rows/,
    );
    await expect(plan({ shardCount: 11, specs: [{ generator: "group-hash" }] })).rejects.toThrow(
      /11 shards for 10 groups/,
    );
  });

  it("refuses a group generator without a group column, before reading", async () => {
    await expect(
      plan({ groupColumn: undefined, specs: [{ generator: "group-balanced" }] }),
    ).rejects.toThrow(/needs a group column/);
  });

  it("refuses a group column that is the label, or that does not exist", async () => {
    await expect(plan({ groupColumn: "Species" })).rejects.toThrow(AnalysisInputError);
    await expect(plan({ groupColumn: "nest" })).rejects.toThrow(/there is no group column "nest"/);
  });

  it("refuses fewer than two shards, a shard column and a generator named twice", async () => {
    await expect(plan({ shardCount: 1 })).rejects.toThrow(/at least 2/);
    await expect(plan({ options: { ...options, shardColumn: "site" } })).rejects.toThrow(
      /no shard column/,
    );
    await expect(plan({ specs: [{ generator: "iid" }, { generator: "iid" }] })).rejects.toThrow(
      /asked for twice/,
    );
  });

  it("names the rows that have no group", async () => {
    const holes = csv.replace(/,Torgersen-MALE\n/, ",\n");
    await expect(
      planLayouts({
        data: Readable.from([holes]),
        dataName: "holes.csv",
        options,
        groupColumn: "site",
        shardCount: 3,
        threads: 1,
      }),
    ).rejects.toThrow(/1 kept rows have no group \(rows \d+\)/);
  });

  it("records a failed candidate and goes on with the others", async () => {
    const { comparison } = await plan({
      specs: [{ generator: "classes", k: 1 }, { generator: "iid" }],
      shardCount: 2,
    });
    expect(comparison.layouts.map((layout) => layout.name)).toEqual(["iid"]);
    expect(comparison.failures).toMatchObject([
      { name: "classes-1", badInput: true, message: expect.stringMatching(/unheld/) },
    ]);
  });

  it("fails the plan, not the candidate, when a scored candidate cannot be stored", async () => {
    const stored: string[] = [];
    const outcome = plan({
      specs: [{ generator: "iid" }, { generator: "stratified" }],
      onCandidate: async (candidateOutcome) => {
        if ("failure" in candidateOutcome) stored.push(`failed ${candidateOutcome.failure.name}`);
        else throw new Error("storage is unreachable");
      },
    });
    await expect(outcome).rejects.toThrow(/storage is unreachable/);
    expect(stored).toEqual([]);
  });

  it("stops at once when cancelled", async () => {
    const controller = new AbortController();
    controller.abort(new Error("cancelled by the user"));
    await expect(plan({ signal: controller.signal })).rejects.toThrow(/cancelled by the user/);
  });
});
