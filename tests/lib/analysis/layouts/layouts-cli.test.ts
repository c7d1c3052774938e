import { execFile } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { beforeAll, describe, expect, it } from "vitest";
import type { LayoutComparison, PartitionSummary } from "@/lib/analysis";
import { loadPenguinsCsv } from "../support/open-data";

const run = promisify(execFile);
const root = path.resolve(import.meta.dirname, "../../../..");
const directory = mkdtempSync(path.join(tmpdir(), "partita-layouts-cli-"));

/** Runs a script of scripts/ as the user would (node with the tsx loader) and captures the outcome. */
async function runScript(
  script: string,
  args: string[],
): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run(
      process.execPath,
      ["--import", "tsx", `scripts/${script}`, ...args],
      { cwd: root, env: { ...process.env, DEBUG: "" } },
    );
    return { code: 0, stdout, stderr };
  } catch (error) {
    const failure = error as { code: number; stdout: string; stderr: string };
    return { code: failure.code, stdout: failure.stdout, stderr: failure.stderr };
  }
}

/** Penguins (vega-datasets; Gorman, Williams & Fraser 2014) with a site column: island × sex. */
function writePenguins(): string {
  const lines = loadPenguinsCsv().csv.trim().split("\n");
  const withSites = [
    `${lines[0]},site`,
    ...lines.slice(1).map((line) => {
      const fields = line.split(",");
      return `${line},${fields[2]}-${fields[7] || "unknown"}`;
    }),
  ];
  const file = path.join(directory, "penguins.csv");
  writeFileSync(file, `${withSites.join("\n")}\n`);
  return file;
}

const data = writePenguins();
const base = ["--data", data, "--label", "Species", "--id-column", "row"];

describe("layouts CLI", () => {
  const outDir = path.join(directory, "out");
  let result: { code: number; stderr: string };
  let comparison: LayoutComparison;
  beforeAll(async () => {
    result = await runScript("layouts.ts", [
      ...base,
      "--shards",
      "3",
      "--group",
      "site",
      "--generators",
      "iid,dirichlet:0.5,classes:2,group-balanced",
      "--seed",
      "7",
      "--rounds",
      "50",
      "--out-dir",
      outDir,
    ]);
    comparison = JSON.parse(readFileSync(path.join(outDir, "layouts.json"), "utf8"));
  }, 120_000);

  it("writes one map per candidate and layouts.json with the §8 keys (exit 0)", () => {
    expect(result.code).toBe(0);
    for (const name of ["iid", "dirichlet-0.5", "classes-2", "group-balanced"]) {
      expect(existsSync(path.join(outDir, `${name}.csv`))).toBe(true);
    }
    expect(comparison.layouts).toHaveLength(4);
    for (const layout of comparison.layouts) {
      expect(Object.keys(layout).sort()).toEqual(
        ["generator", "name", "parameters", "seed", "shards", "summary"].sort(),
      );
      expect(layout.seed).toBe(7);
      expect(layout.summary.advice.rounds).toBe(50);
    }
    expect(comparison.layouts.find((layout) => layout.name === "dirichlet-0.5")).toMatchObject({
      generator: "dirichlet",
      parameters: { alpha: 0.5 },
    });
    expect(result.stderr).toMatch(/group-balanced/);
  });

  // The contract's read-back through the other command: analyze given an exported map and the same
  // flags prints the summary the comparison holds.
  it.each(["dirichlet-0.5", "group-balanced"])(
    "analyze reads %s.csv back to the summary in layouts.json",
    async (name) => {
      const out = path.join(directory, `${name}-summary.json`);
      const analysis = await runScript("analyze.ts", [
        ...base,
        "--partition",
        path.join(outDir, `${name}.csv`),
        "--rounds",
        "50",
        "--out",
        out,
      ]);
      expect(analysis.code).toBe(0);
      const summary = JSON.parse(readFileSync(out, "utf8")) as PartitionSummary;
      expect(summary).toEqual(comparison.layouts.find((layout) => layout.name === name)?.summary);
    },
    120_000,
  );

  it.each([
    [["--shards", "3", "--generators", "iid,shuffle"], /unknown layout generator "shuffle"/],
    [["--shards", "400", "--generators", "iid"], /400 shards for 344 kept rows/],
    [
      ["--shards", "11", "--group", "site", "--generators", "group-hash"],
      /11 shards for 10 groups/,
    ],
    [["--shards", "3", "--generators", "group-balanced"], /needs a group column/],
    [["--shards", "3", "--generators", "clusters:4"], /takes no parameter/],
    [["--shards", "three"], /--shards is "three"/],
    [["--generators", "iid"], /missing --shards, --out-dir/],
  ])(
    "exits 2 with a clear message for bad input %#",
    async (args, message) => {
      const failed = await runScript("layouts.ts", [
        ...base,
        ...(args as string[]),
        ...((args as string[]).includes("--shards")
          ? ["--out-dir", path.join(directory, "x")]
          : []),
      ]);
      expect(failed.code).toBe(2);
      expect(failed.stderr).toMatch(message as RegExp);
      expect(failed.stderr).not.toMatch(/ at .*\.ts:\d+/); // no stack trace
    },
    60_000,
  );
});
