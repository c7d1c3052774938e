import { execFile } from "node:child_process";
import { createReadStream, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { describe, expect, it } from "vitest";
import { analyzePartition, type PartitionSummary } from "@/lib/analysis";
import { penguinsWithShards } from "./support/simulation-data";

const run = promisify(execFile);
const root = path.resolve(import.meta.dirname, "../../..");
const directory = mkdtempSync(path.join(tmpdir(), "partita-simulate-"));
const data = path.join(directory, "penguins.csv");
// Open data: the vega-datasets penguins, one shard per island.
writeFileSync(
  data,
  penguinsWithShards((_, record) => record.Island),
);

/** Runs `scripts/analyze.ts` as the user would and captures the outcome. */
async function runCli(args: string[]): Promise<{ code: number; stdout: string; stderr: string }> {
  try {
    const { stdout, stderr } = await run(
      process.execPath,
      ["--import", "tsx", "scripts/analyze.ts", ...args],
      { cwd: root, env: { ...process.env, DEBUG: "" } },
    );
    return { code: 0, stdout, stderr };
  } catch (error) {
    const failure = error as { code: number; stdout: string; stderr: string };
    return { code: failure.code, stdout: failure.stdout, stderr: failure.stderr };
  }
}

const BASE = ["--data", data, "--label", "Species", "--shard-column", "part"];

describe("analyze CLI --simulate", () => {
  it("adds the simulation keys of methods.md §7 to the JSON and reports runs on stderr", async () => {
    const out = path.join(directory, "summary.json");
    const plan = ["--rounds", "6", "--local-steps", "2", "--batch-size", "4"];
    const result = await runCli([...BASE, ...plan, "--simulate", "--seeds", "2", "--out", out]);
    expect(result.code).toBe(0);
    const summary = JSON.parse(readFileSync(out, "utf8")) as PartitionSummary;
    const simulation = summary.simulation;
    expect(simulation).toMatchObject({ seeds: 2, generator: "xoshiro128**" });
    expect(simulation?.algorithms.map((algorithm) => algorithm.name)).toEqual([
      "minibatch",
      "local",
      "scaffold",
    ]);
    for (const algorithm of simulation?.algorithms ?? []) {
      expect(algorithm.curve).toHaveLength(7);
      // S = 2: the mean over the seeds is the midpoint of their minimum and maximum, and the
      // curve ends at it (methods.md §7).
      const [final, finalMin, finalMax] = [
        algorithm.final,
        algorithm.finalMin,
        algorithm.finalMax,
      ] as number[];
      expect(final).toBeCloseTo((finalMin + finalMax) / 2, 14);
      expect(algorithm.curve.at(-1)).toEqual([6, final]);
    }
    // The command line hands the plan to the engine unchanged: the engine called directly on the
    // same file and options gives the same simulation, bit for bit (methods.md §7, determinism).
    const direct = await analyzePartition({
      data: createReadStream(data),
      options: {
        labelColumn: "Species",
        shardColumn: "part",
        rounds: 6,
        localSteps: 2,
        batchSize: 4,
        simulate: { seeds: 2 },
      },
    });
    expect(simulation).toEqual(direct.simulation);
    // 3 × (8 grid runs + 3 places to extend the grid + S = 2 seeds) = 39.
    expect(result.stderr).toContain("partita: simulating run 39/39 (scaffold, seeds)");
    for (const algorithm of simulation?.algorithms ?? []) {
      expect(typeof algorithm.stepSizeAtEdge).toBe("boolean");
    }
    expect(result.stderr).toContain(simulation?.note);
  });

  it("refuses above the budget with exit 2 and says what to change; --seeds needs --simulate", async () => {
    const refused = await runCli([...BASE, "--simulate", "--rounds", "5000", "--budget", "1e9"]);
    expect(refused.code).toBe(2);
    expect(refused.stderr).toContain(
      "partita: bad input: the simulation would take about 5.23e9 multiply-adds, above the budget of 1.00e9",
    );
    // 5000 × 1e9 / 5.23e9 → 956 rounds; 3 participants and 3 seeds fit at no value of at least 1.
    expect(refused.stderr).toContain("(expected at most 956 rounds, or a larger budget)");
    expect(refused.stdout).toBe("");
    const stray = await runCli([...BASE, "--seeds", "2"]);
    expect(stray.code).toBe(2);
    expect(stray.stderr).toContain("--seeds only applies with --simulate");
  });
});
