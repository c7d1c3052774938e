// One report of 100,000 shards (clients of a federated population) end to end: the CLI against the
// running test app uploads a generated dataset and partition map through /api/v1, the worker that
// `npm test` runs analyses them and stores the report, the API returns its summary, and the report
// page a signed-in reader fetches stays under 1 MB of HTML (a functional bound on what one page
// sends, not a timing). The data are invented and seeded (Partita's generator, lib/math/random.ts).
import { execFile } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { count, eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { reports, reportShards, users } from "@/db/schema";
import { SeededRandom } from "@/lib/math/random";
import { uniqueEmail } from "@/tests/support/accounts";
import { issueTestToken } from "@/tests/support/api-tokens";
import { baseUrl, openBrowser, type BrowserSession } from "./support/browser";
import { signUpThroughForm } from "./support/sign-up";

const CLIENTS = 100_000;
const ROWS_PER_CLIENT = 2;
const root = path.resolve(import.meta.dirname, "../..");
const folder = mkdtempSync(path.join(os.tmpdir(), "partita-e2e-large-"));
const datasetFile = path.join(folder, "clients.csv");
const mapFile = path.join(folder, "clients-map.csv");
const email = uniqueEmail("large");
const password = "a large report password";

/**
 * Two rows per client, three classes: each client favours one class (label skew) and shifts its
 * first feature (feature skew). Shard ids are zero-padded, so code-point order is numeric order.
 */
function writeClientData(): void {
  const random = new SeededRandom(100_000);
  const rows = ["row,x0,x1,label"];
  const map = ["row_id,shard"];
  for (let client = 0; client < CLIENTS; client++) {
    const favourite = random.integer(3);
    const shift = random.normal();
    for (let copy = 0; copy < ROWS_PER_CLIENT; copy++) {
      const row = client * ROWS_PER_CLIENT + copy;
      const label = random.uniform() < 0.7 ? favourite : random.integer(3);
      const x0 = label + shift + random.normal();
      rows.push(`${row},${x0.toFixed(4)},${random.normal().toFixed(4)},class-${label}`);
      map.push(`${row},client-${String(client).padStart(6, "0")}`);
    }
  }
  writeFileSync(datasetFile, `${rows.join("\n")}\n`);
  writeFileSync(mapFile, `${map.join("\n")}\n`);
}

function runCliOnServer(token: string): Promise<{ code: number; stdout: string; stderr: string }> {
  const args = ["--import", "tsx", "scripts/analyze.ts", "--data", datasetFile];
  args.push("--label", "label", "--id-column", "row", "--partition", mapFile);
  args.push("--server", baseUrl(), "--token", token);
  return new Promise((resolve) => {
    execFile(
      process.execPath,
      args,
      { cwd: root, env: { ...process.env, DEBUG: "" }, maxBuffer: 256 * 1024 * 1024 },
      (error, stdout, stderr) =>
        resolve({
          code: error ? Number((error as { code?: number }).code ?? 1) : 0,
          stdout,
          stderr,
        }),
    );
  });
}

let browser: BrowserSession | undefined;
let workspacePath: string;
let workspaceId: string;
let token: string;

beforeAll(async () => {
  writeClientData();
  browser = await openBrowser();
  const { page } = browser;
  await signUpThroughForm(page, {
    name: "Federated Lead",
    email,
    password,
    workspaceName: "Federated clients",
  });
  workspacePath = new URL(page.url()).pathname;
  workspaceId = workspacePath.split("/")[2];
  const [user] = await db().select({ id: users.id }).from(users).where(eq(users.email, email));
  ({ token } = await issueTestToken(user.id, workspaceId));
});

afterAll(async () => {
  await browser?.close();
  rmSync(folder, { recursive: true, force: true });
  await closeDb();
});

type Summary = {
  dataset: { rows: number };
  shards: { id: string; rows: number; tv: number }[];
  labelSkew: { tv: number };
};

describe("a report of 100,000 shards", () => {
  it("is analysed by the worker, stored whole, and served in pages under 1 MB", async () => {
    const run = await runCliOnServer(token);
    expect(run.stderr).not.toContain("internal error");
    expect(run.code).toBe(0);
    const summary = JSON.parse(run.stdout) as Summary;
    expect(summary.shards).toHaveLength(CLIENTS);
    expect(summary.shards[CLIENTS - 1].id).toBe("client-099999");
    // methods.md §1 and §4: every kept row is on one shard, and the report's label skew is the
    // rows-weighted mean of the shards' (an identity; the sum is over 100,000 terms, hence 1e-9).
    expect(summary.shards.reduce((sum, shard) => sum + shard.rows, 0)).toBe(summary.dataset.rows);
    expect(summary.dataset.rows).toBe(CLIENTS * ROWS_PER_CLIENT);
    const weightedTv = summary.shards.reduce(
      (sum, shard) => sum + (shard.rows / summary.dataset.rows) * shard.tv,
      0,
    );
    expect(Math.abs(weightedTv - summary.labelSkew.tv)).toBeLessThan(1e-9);

    const [report] = await db()
      .select({ id: reports.id, shardCount: reports.shardCount })
      .from(reports)
      .where(eq(reports.workspaceId, workspaceId));
    expect(report.shardCount).toBe(CLIENTS);
    const [stored] = await db()
      .select({ shards: count() })
      .from(reportShards)
      .where(eq(reportShards.reportId, report.id));
    expect(stored.shards).toBe(CLIENTS);

    // The page as the server sends it, with the session of the sign-up (no script run).
    const { page } = browser!;
    const reportPath = `${workspacePath}/reports/${report.id}`;
    for (const query of ["", "?sort=tv&page=2"]) {
      const response = await page.request.get(`${reportPath}${query}`);
      expect(response.status()).toBe(200);
      expect((await response.body()).length).toBeLessThan(1_000_000);
    }
    // Page 2 sorted by TV, largest first: the 101st to 200th shards of a sort of the API's JSON.
    await page.goto(`${reportPath}?sort=tv&page=2`);
    const pages = page.getByRole("navigation", { name: "Pages of the per-shard table" });
    expect(await pages.textContent()).toContain("Shards 101–200 of 100,000, sorted by TV");
    const byTv = [...summary.shards].sort((a, b) => b.tv - a.tv).slice(100, 200);
    const table = page.getByRole("table", { name: /Per-shard figures/ });
    const shownTv = (await table.locator("tbody tr td:nth-of-type(2)").allTextContents()).map(
      Number,
    );
    expect(shownTv).toHaveLength(100);
    // The page shows three significant digits.
    expect(shownTv[0]).toBeCloseTo(byTv[0].tv, 3);
    expect(shownTv[99]).toBeCloseTo(byTv[99].tv, 3);

    // The CSV export still holds every shard.
    const csv = await page.request.get(
      `/api/workspaces/${workspaceId}/reports/${report.id}/shards.csv`,
    );
    expect(csv.status()).toBe(200);
    const lines = (await csv.text()).trimEnd().split("\n");
    expect(lines).toHaveLength(CLIENTS + 1);
    // Its header names the columns as the page's table does (the page's headings carry the sort
    // arrow of the sorted column, which the file has no use for).
    const headings = (await table.locator("thead th").allTextContents()).map((text) =>
      text.replace(/ [↑↓]$/, ""),
    );
    expect(lines[0].replace(/^\uFEFF/, "").trimEnd()).toBe(headings.join(","));
  }, 900_000);
});
