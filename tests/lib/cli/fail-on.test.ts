// --fail-on: the grammar on its own, then the CLI's exit codes as a child process on open data —
// penguins from the `vega-datasets` npm package (BSD-3), sharded by island. Facts used: the data
// has three islands and Torgersen holds only Adélie penguins (the dataset's documentation), so the
// label skew is above zero; and Jensen–Shannon in nats is at most ln 2 (methods.md, Lin 1991).
import { execFile } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import {
  checkFailOnRules,
  FailOnRuleError,
  parseFailOnRule,
  type FailOnRule,
} from "@/lib/cli/fail-on";
import { loadPenguinsCsv } from "@/tests/lib/analysis/support/open-data";

const root = path.resolve(import.meta.dirname, "../../..");
const directory = mkdtempSync(path.join(tmpdir(), "partita-fail-on-"));
const dataPath = path.join(directory, "penguins.csv");

type Run = { code: number; stdout: string; stderr: string };

function runCli(extraFlags: string[]): Promise<Run> {
  const args = ["--import", "tsx", "scripts/analyze.ts", "--data", dataPath, "--label", "Species"];
  args.push("--shard-column", "Island", "--id-column", "row", ...extraFlags);
  return new Promise((resolve) => {
    execFile(
      process.execPath,
      args,
      { cwd: root, env: { ...process.env, DEBUG: "" }, maxBuffer: 64 * 1024 * 1024 },
      (error, stdout, stderr) => {
        const code = error ? Number((error as { code?: number }).code ?? 1) : 0;
        resolve({ code, stdout, stderr });
      },
    );
  });
}

let plain: Run;
let verdict: string;

beforeAll(async () => {
  writeFileSync(dataPath, loadPenguinsCsv().csv);
  plain = await runCli([]);
  verdict = (JSON.parse(plain.stdout) as { advice: { verdict: string } }).advice.verdict;
});

afterAll(() => rmSync(directory, { recursive: true, force: true }));

describe("parseFailOnRule", () => {
  it("reads aliases, dotted paths, every operator and both kinds of value", () => {
    expect(parseFailOnRule("js>0.1")).toMatchObject({
      path: "labelSkew.js",
      operator: ">",
      value: 0.1,
    });
    expect(parseFailOnRule(" verdict != local-updates ")).toMatchObject({
      path: "advice.verdict",
      operator: "!=",
      value: "local-updates",
    });
    expect(parseFailOnRule("heterogeneity.zeta2Max>=1e-3")).toMatchObject({
      path: "heterogeneity.zeta2Max",
      operator: ">=",
      value: 0.001,
    });
    expect(parseFailOnRule("shards==3").operator).toBe("=");
    expect(parseFailOnRule("ratio<=2").operator).toBe("<=");
    expect(parseFailOnRule("alpha<0.5").path).toBe("labelSkew.dirichletAlpha");
  });

  it.each(["js", "js>", ">0.1", "js>>0.1", "js=>0.1", "verdict>local", "skew>0.1", "9js>1"])(
    "refuses %s",
    (rule) => {
      expect(() => parseFailOnRule(rule)).toThrow(FailOnRuleError);
    },
  );
});

describe("checkFailOnRules", () => {
  const summary = {
    labelSkew: { js: 0.2, categories: ["a", "b"] },
    advice: { verdict: "large-minibatch", ratio: null, heterogeneityBarrier: false },
    shards: [{}, {}],
  };
  const crossed = (rule: string) => checkFailOnRules(summary, [parseFailOnRule(rule)])[0].crossed;

  it("crosses exactly when the written condition holds", () => {
    expect([crossed("js>0.2"), crossed("js>=0.2"), crossed("js<0.2"), crossed("js<=0.2")]).toEqual([
      false,
      true,
      false,
      true,
    ]);
    expect([crossed("verdict=large-minibatch"), crossed("verdict!=large-minibatch")]).toEqual([
      true,
      false,
    ]);
    expect([crossed("barrier=false"), crossed("shards=2")]).toEqual([true, true]);
  });

  it("fails a rule on a figure that was not measured (null)", () => {
    expect(crossed("ratio>10")).toBe(true);
  });

  it("refuses a path that names no number or word", () => {
    const rules: FailOnRule[] = [parseFailOnRule("labelSkew.categories=1")];
    expect(() => checkFailOnRules(summary, rules)).toThrow(FailOnRuleError);
    expect(() => checkFailOnRules(summary, [parseFailOnRule("labelSkew.nothing>1")])).toThrow(
      /not a number or word/,
    );
    expect(() => checkFailOnRules(summary, [parseFailOnRule("verdict>1")])).toThrow(/not a number/);
  });
});

describe("npm run analyze -- --fail-on", () => {
  it("exits 0 and prints the same JSON when no rule is crossed", async () => {
    expect(plain.code).toBe(0);
    const run = await runCli([
      "--fail-on",
      "js>0.6932", // JS in nats never exceeds ln 2 ≈ 0.693147
      "--fail-on",
      "shards!=3",
      "--fail-on",
      `verdict!=${verdict}`,
    ]);
    expect(run.code).toBe(0);
    expect(run.stdout).toBe(plain.stdout);
    expect(run.stderr).not.toContain("fail-on");
  });

  it("exits 3 and lists each crossed rule, and only those", async () => {
    const run = await runCli(["--fail-on", "js>0", "--fail-on", "shards=3", "--fail-on", "tv<0"]);
    expect(run.code).toBe(3);
    expect(run.stdout).toBe(plain.stdout);
    const lines = run.stderr.split("\n").filter((line) => line.includes("fail-on"));
    expect(lines).toEqual([
      expect.stringMatching(/^partita: fail-on js>0: labelSkew\.js is 0\.\d+/),
      "partita: fail-on shards=3: shards.length is 3",
    ]);
  });

  it("exits 2 for a malformed rule, before analysing anything", async () => {
    const run = await runCli(["--fail-on", "js>>0.1"]);
    expect(run.code).toBe(2);
    expect(run.stdout).toBe("");
    expect(run.stderr).toContain('--fail-on "js>>0.1"');
    expect(run.stderr).not.toContain("reading");
  });

  it("exits 2 for a path that names nothing in the summary", async () => {
    const run = await runCli(["--fail-on", "labelSkew.nothing>1"]);
    expect(run.code).toBe(2);
    expect(run.stderr).toContain("labelSkew.nothing is not a number or word");
  });
});
