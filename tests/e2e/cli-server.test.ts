// The CLI against the running test app (E2E_BASE_URL) and its worker: `npm run analyze -- --server
// URL --token T` uploads penguins and an island layout through /api/v1, waits for the worker, and
// prints the report's JSON; the same figures as the local engine on the same files, and --fail-on
// gates on them. Open data: penguins from the `vega-datasets` npm package (BSD-3), split by island.
// The user and token are made straight in the database, as the tokens page would make them.
import { execFile } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import { loadPenguinsCsv } from "@/tests/lib/analysis/support/open-data";
import { createAccount } from "@/tests/support/accounts";
import { issueTestToken } from "@/tests/support/api-tokens";

const root = path.resolve(import.meta.dirname, "../..");
const baseUrl = process.env.E2E_BASE_URL ?? "http://127.0.0.1:3000";
const folder = mkdtempSync(path.join(os.tmpdir(), "partita-e2e-cli-"));
const { csv, islandMap } = loadPenguinsCsv();
const datasetFile = path.join(folder, "penguins.csv");
const layoutFile = path.join(folder, "islands.csv");
writeFileSync(datasetFile, csv);
writeFileSync(layoutFile, islandMap);

type Run = { code: number; stdout: string; stderr: string };

function runCli(flags: string[], env: Record<string, string> = {}): Promise<Run> {
  const args = ["--import", "tsx", "scripts/analyze.ts", "--data", datasetFile];
  args.push("--label", "Species", "--id-column", "row", "--partition", layoutFile, ...flags);
  return new Promise((resolve) => {
    execFile(
      process.execPath,
      args,
      { cwd: root, env: { ...process.env, DEBUG: "", ...env }, maxBuffer: 64 * 1024 * 1024 },
      (error, stdout, stderr) => {
        resolve({
          code: error ? Number((error as { code?: number }).code ?? 1) : 0,
          stdout,
          stderr,
        });
      },
    );
  });
}

type Summary = {
  shards: { id: string; rows: number }[];
  labelSkew: { js: number; tv: number };
  heterogeneity: { zeta2: number; sigma2: number };
  advice: { verdict: string; ratio: number | null };
};

let token: string;
let local: Summary;

beforeAll(async () => {
  const analyst = await createAccount("cli");
  ({ token } = await issueTestToken(analyst.id, analyst.workspaceId));
  const run = await runCli([]);
  expect(run.code).toBe(0);
  local = JSON.parse(run.stdout) as Summary;
});

afterAll(async () => {
  rmSync(folder, { recursive: true, force: true });
  await closeDb();
});

describe("npm run analyze -- --server", () => {
  it("runs on the server with the local engine's figures, progress on stderr", async () => {
    const run = await runCli(["--server", baseUrl, "--token", token]);
    expect(run.stderr).not.toContain("internal error");
    expect(run.code).toBe(0);
    // Polled once a second, so a quick run may show some of its stages or none (it can finish
    // before the first poll); the human summary on stderr always comes.
    expect(run.stderr).toMatch(/rows \d+, features \d+, classification/);
    // The report's id and page, so a pipeline can link to what it just made.
    const stored = run.stderr.match(/partita: report ([\w-]+): (\S+)\n/);
    expect(stored?.[2]).toMatch(new RegExp(`/w/[\\w-]+/reports/${stored?.[1]}$`));
    expect(run.stderr).toMatch(/partita: analysis [\w-]+ started on http/);
    const remote = JSON.parse(run.stdout) as Summary;
    expect(remote.shards.map((shard) => [shard.id, shard.rows])).toEqual(
      local.shards.map((shard) => [shard.id, shard.rows]),
    );
    expect(remote.advice.verdict).toBe(local.advice.verdict);
    expect(remote.labelSkew.js).toBeCloseTo(local.labelSkew.js, 10);
    expect(remote.heterogeneity.zeta2).toBeCloseTo(local.heterogeneity.zeta2, 10);
    expect(remote.heterogeneity.sigma2).toBeCloseTo(local.heterogeneity.sigma2, 10);
  });

  it("gates on the server's summary: exit 3 for a crossed rule, token from the environment", async () => {
    const run = await runCli(["--server", baseUrl, "--fail-on", "js>0", "--fail-on", "shards!=3"], {
      PARTITA_API_TOKEN: token,
    });
    expect(run.code).toBe(3);
    expect(run.stderr).toMatch(/partita: fail-on js>0: labelSkew\.js is 0\.\d+/);
    expect(run.stderr).not.toContain("shards!=3");
  });

  it("exits 2 with the server's reason for a bad token, before uploading", async () => {
    const run = await runCli(["--server", baseUrl, "--token", `prtk_${"x".repeat(43)}`]);
    expect(run.code).toBe(2);
    expect(run.stderr).toContain("the server refused (invalid_token)");
    expect(run.stderr).not.toContain("reading");
  });
});
