import Papa from "papaparse";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";

vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));

import { GET as getShardsCsv } from "@/app/api/workspaces/[workspaceId]/reports/[reportId]/shards.csv/route";
import { GET as getSummaryJson } from "@/app/api/workspaces/[workspaceId]/reports/[reportId]/summary.json/route";
import { closeDb } from "@/db/client";
import type { PartitionSummary } from "@/lib/analysis";
import type { SessionUser } from "@/lib/auth/session";
import { createAccount, createTeam } from "@/tests/support/accounts";
import { actAs } from "@/tests/support/fake-session";
import { insertReport, printPenguinsSummaryWithCli } from "@/tests/support/report-fixtures";

afterAll(closeDb);

type Handler = typeof getSummaryJson;

function call(handler: Handler, workspaceId: string, reportId: string): Promise<Response> {
  const request = new Request(
    `http://partita.test/api/workspaces/${workspaceId}/reports/${reportId}`,
  );
  return handler(request, { params: Promise.resolve({ workspaceId, reportId }) });
}

let cliOutput: string;
let cliSummary: PartitionSummary;
let team: Awaited<ReturnType<typeof createTeam>>;
let reportId: string;

beforeAll(async () => {
  // The CLI as a child process on open data: penguins (vega-datasets, BSD-3), shards = island.
  cliOutput = await printPenguinsSummaryWithCli();
  cliSummary = JSON.parse(cliOutput) as PartitionSummary;
  team = await createTeam();
  ({ reportId } = await insertReport({
    workspaceId: team.workspaceId,
    authorId: team.analyst.id,
    summary: cliSummary,
    title: "Penguins by island",
  }));
});

describe("GET …/reports/[reportId]/summary.json", () => {
  it("returns what the CLI printed, plus the inputs as analysed, as a download", async () => {
    actAs(team.reviewer);
    const response = await call(getSummaryJson, team.workspaceId, reportId);
    expect(response.status).toBe(200);
    expect(response.headers.get("content-type")).toBe("application/json; charset=utf-8");
    expect(response.headers.get("content-disposition")).toBe(
      'attachment; filename="penguins-by-island-v1.summary.json"',
    );
    // Byte for byte what the CLI printed (the same keys in the same order, the same numbers, the
    // same layout), followed by the inputs as analysed, so the file stands on its own.
    const text = await response.text();
    const { inputs, ...summary } = JSON.parse(text) as PartitionSummary & { inputs: unknown };
    expect(`${JSON.stringify(summary, null, 2)}\n`).toBe(cliOutput);
    expect(text.startsWith(cliOutput.slice(0, -3))).toBe(true);
    expect(inputs).toEqual({
      files: [{ kind: "dataset", name: "penguins.csv", sizeBytes: 15_000, sha256: "0".repeat(64) }],
      parameters: expect.objectContaining({ labelColumn: "Species", shardColumn: "Island" }),
    });
    const exported = JSON.parse(text) as PartitionSummary;
    // The island split of methods.md's test data: three shards in code-point order.
    expect(exported.shards.map((shard) => shard.id)).toEqual(["Biscoe", "Dream", "Torgersen"]);
  });
});

describe("GET …/reports/[reportId]/shards.csv", () => {
  it("parses back to the per-shard rows of the summary", async () => {
    actAs(team.owner);
    const response = await call(getShardsCsv, team.workspaceId, reportId);
    expect(response.status).toBe(200);
    expect(response.headers.get("content-type")).toBe("text/csv; charset=utf-8");
    expect(response.headers.get("content-disposition")).toContain(
      "penguins-by-island-v1.shards.csv",
    );
    const bytes = new Uint8Array(await response.arrayBuffer());
    // UTF-8's byte order mark first, so spreadsheets read the headings' symbols as UTF-8.
    expect([...bytes.subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    // TextDecoder drops the mark, as a UTF-8 reader does.
    const parsed = Papa.parse<Record<string, string>>(new TextDecoder().decode(bytes), {
      header: true,
      skipEmptyLines: true,
    });
    expect(parsed.errors).toEqual([]);
    // The headings are the page table's (components/reports/shard-table.tsx).
    expect(
      parsed.data.map((row) => ({
        id: row.Shard,
        rows: Number(row.Rows),
        tv: Number(row.TV),
        hellinger: Number(row.Hellinger),
        js: Number(row.JS),
        kl: Number(row.KL),
        gradNorm2: Number(row["‖gₘ‖²"]),
        sigma2: Number(row["σₘ²"]),
        loss: Number(row["Fₘ"]),
        classesPresent: Number(row.Classes),
        effectiveClasses: Number(row["Eff. classes"]),
        featureShift: Number(row["Feature shift"]),
      })),
    ).toEqual(
      cliSummary.shards.map((shard) => {
        const figures: Partial<typeof shard> = { ...shard };
        delete figures.labelCounts; // the CSV holds the per-shard table, not the label counts
        return figures;
      }),
    );
  });

  it("neutralizes a shard id that a spreadsheet would run as a formula (OWASP CSV injection)", async () => {
    const hostile = structuredClone(cliSummary);
    hostile.shards[0].id = '=HYPERLINK("http://x.invalid","open")';
    const { reportId: hostileId } = await insertReport({
      workspaceId: team.workspaceId,
      authorId: team.owner.id,
      summary: hostile,
    });
    actAs(team.analyst);
    const text = await (await call(getShardsCsv, team.workspaceId, hostileId)).text();
    const firstCell = Papa.parse<string[]>(text, { skipEmptyLines: true }).data[1][0];
    expect(firstCell).toBe('\'=HYPERLINK("http://x.invalid","open")');
  });
});

describe("report exports: who may download", () => {
  const handlers = { "summary.json": getSummaryJson, "shards.csv": getShardsCsv };

  it.each(Object.entries(handlers))(
    "%s: every member 200, stranger 404, signed out 401",
    async (_, handler) => {
      for (const member of [team.owner, team.analyst, team.reviewer]) {
        actAs(member);
        expect((await call(handler, team.workspaceId, reportId)).status).toBe(200);
      }
      const stranger = await createAccount("stranger");
      actAs(stranger);
      expect((await call(handler, team.workspaceId, reportId)).status).toBe(404);
      actAs(null);
      const signedOut = await call(handler, team.workspaceId, reportId);
      expect(signedOut.status).toBe(401);
      expect(await signedOut.json()).toMatchObject({ error: { code: "unauthenticated" } });
    },
  );

  it.each(Object.entries(handlers))(
    "%s: 404 for another workspace's report asked for through this one, and for an unknown id",
    async (_, handler) => {
      const other: SessionUser & { workspaceId: string } = await createAccount("other");
      const { reportId: foreignReport } = await insertReport({
        workspaceId: other.workspaceId,
        authorId: other.id,
        summary: cliSummary,
      });
      actAs(team.owner);
      const response = await call(handler, team.workspaceId, foreignReport);
      expect(response.status).toBe(404);
      expect(await response.json()).toMatchObject({ error: { code: "not_found" } });
      actAs(team.owner);
      expect((await call(handler, team.workspaceId, "no-such-report")).status).toBe(404);
    },
  );
});
