import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq, sql } from "drizzle-orm";
import { closeDb, db } from "@/db/client";
import {
  findReport,
  findShardPage,
  findReportShardTable,
  findReportSummary,
  listReportAuthors,
  listReportPage,
  listReports,
} from "@/db/queries/reports";
import { reports } from "@/db/schema";
import { TOP_CHART_SHARDS } from "@/lib/reports/chart-shards";
import { buildLabelMix, selectDivergenceCandidates } from "@/lib/reports/report-view";
import { decodeReportCursor, type ReportCursor } from "@/lib/reports/report-cursor";
import type { PartitionSummary } from "@/lib/analysis";
import { createAccount, createTeam } from "@/tests/support/accounts";
import {
  analyzePenguinColoniesWithCli,
  analyzePenguinsWithCli,
  insertReport,
} from "@/tests/support/report-fixtures";

afterAll(closeDb);

let summary: PartitionSummary;
let team: Awaited<ReturnType<typeof createTeam>>;
const ids: Record<string, string> = {};

function withVerdict(verdict: PartitionSummary["advice"]["verdict"]): PartitionSummary {
  const copy = structuredClone(summary);
  copy.advice.verdict = verdict;
  return copy;
}

const day = (date: number) => new Date(Date.UTC(2026, 2, date, 12));

beforeAll(async () => {
  summary = await analyzePenguinsWithCli();
  team = await createTeam();
  const { workspaceId } = team;
  ids.first = (
    await insertReport({
      workspaceId,
      authorId: team.analyst.id,
      summary: withVerdict("no-clear-winner"),
      title: "Orchard split 100% by valley",
      createdAt: day(1),
    })
  ).reportId;
  ids.revision = (
    await insertReport({
      workspaceId,
      authorId: team.owner.id,
      summary: withVerdict("local-updates"),
      title: "Orchard split 100% by valley",
      previousReportId: ids.first,
      createdAt: day(3),
    })
  ).reportId;
  ids.shuffled = (
    await insertReport({
      workspaceId,
      authorId: team.analyst.id,
      summary: withVerdict("large-minibatch"),
      title: "Shuffled_orchards",
      createdAt: day(5),
    })
  ).reportId;
  const outsider = await createAccount("outsider");
  ids.foreign = (
    await insertReport({
      workspaceId: outsider.workspaceId,
      authorId: outsider.id,
      summary,
      title: "Orchard split 100% by valley",
      createdAt: day(4),
    })
  ).reportId;
});

const titlesOf = (reports: { title: string; version: number }[]) =>
  reports.map((report) => `${report.title} v${report.version}`);

describe("listReportPage", () => {
  it("pages through every report exactly once, ties and microseconds apart included", async () => {
    const account = await createAccount("paged");
    const sameInstant = new Date("2026-04-01T09:00:00Z");
    const inserted: string[] = [];
    for (let index = 0; index < 5; index++) {
      const { reportId } = await insertReport({
        workspaceId: account.workspaceId,
        authorId: account.id,
        summary,
        title: `Paged ${index}`,
        createdAt: sameInstant,
      });
      inserted.push(reportId);
    }
    // Two reports a microsecond apart: the same millisecond to a JavaScript Date.
    await db()
      .update(reports)
      .set({ createdAt: sql`'2026-04-02 09:00:00.000001+00'::timestamptz` })
      .where(eq(reports.id, inserted[0]));
    await db()
      .update(reports)
      .set({ createdAt: sql`'2026-04-02 09:00:00.000002+00'::timestamptz` })
      .where(eq(reports.id, inserted[1]));

    const whole = (await listReports(account.workspaceId)).map((report) => report.id);
    expect(whole.slice(0, 2)).toEqual([inserted[1], inserted[0]]);
    const paged: string[] = [];
    let cursor: string | null = null;
    let pages = 0;
    do {
      const after: ReportCursor | undefined = cursor ? decodeReportCursor(cursor) : undefined;
      const page = await listReportPage(account.workspaceId, {}, 2, after);
      paged.push(...page.reports.map((report) => report.id));
      cursor = page.nextCursor;
      pages++;
    } while (cursor && pages < 10);
    expect(paged).toEqual(whole);
    expect(pages).toBe(3);
  });
});

describe("listReports", () => {
  it("lists only the workspace's reports, newest first, with lineage and summary figures", async () => {
    const reports = await listReports(team.workspaceId);
    expect(titlesOf(reports)).toEqual([
      "Shuffled_orchards v1",
      "Orchard split 100% by valley v2",
      "Orchard split 100% by valley v1",
    ]);
    expect(reports.map((report) => report.id)).not.toContain(ids.foreign);
    const first = reports[2];
    expect(first).toMatchObject({ latestVersion: 2, lineageId: ids.first, shardCount: 3 });
    expect(first.ratio).toBe(summary.advice.ratio);
    expect(first.datasetRows).toBe(344);
    expect(first.authorName).toBe(team.analyst.name);
  });

  it("takes its figures from the report's own columns, never from the stored summary", async () => {
    // Penguins by island (vega-datasets): 344 rows kept, 3 islands; ρ as the CLI printed it.
    const outsider = await createAccount("list-figures");
    const { reportId } = await insertReport({
      workspaceId: outsider.workspaceId,
      authorId: outsider.id,
      summary,
    });
    // A summary the list would have to parse is replaced by an empty object: the figures stay.
    await db()
      .update(reports)
      .set({ summary: sql`'{}'::json` })
      .where(eq(reports.id, reportId));
    const [listed] = await listReports(outsider.workspaceId);
    expect(listed).toMatchObject({ id: reportId, datasetRows: 344, shardCount: 3 });
    expect(listed.ratio).toBe(summary.advice.ratio);
  });

  it("filters by verdict, author and whole UTC days (both ends included)", async () => {
    const { workspaceId } = team;
    expect(titlesOf(await listReports(workspaceId, { verdict: "local-updates" }))).toEqual([
      "Orchard split 100% by valley v2",
    ]);
    expect(titlesOf(await listReports(workspaceId, { author: team.owner.id }))).toEqual([
      "Orchard split 100% by valley v2",
    ]);
    expect(
      titlesOf(await listReports(workspaceId, { from: "2026-03-01", to: "2026-03-03" })),
    ).toEqual(["Orchard split 100% by valley v2", "Orchard split 100% by valley v1"]);
    expect(await listReports(workspaceId, { from: "2026-03-06" })).toEqual([]);
  });

  it("searches titles case-insensitively, taking % and _ literally", async () => {
    const { workspaceId } = team;
    expect(await listReports(workspaceId, { q: "orchard SPLIT" })).toHaveLength(2);
    expect(titlesOf(await listReports(workspaceId, { q: "100%" }))).toHaveLength(2);
    expect(titlesOf(await listReports(workspaceId, { q: "d_o" }))).toEqual([
      "Shuffled_orchards v1",
    ]);
    // Unescaped, "%" and "_" would match any title.
    expect(await listReports(workspaceId, { q: "1_0" })).toEqual([]);
    expect(await listReports(workspaceId, { q: "100%by" })).toEqual([]);
  });
});

describe("findReport", () => {
  it("returns the report with its lineage and neighbours", async () => {
    const report = await findReport(team.workspaceId, ids.first);
    expect(report?.versions.map((version) => version.id)).toEqual([ids.first, ids.revision]);
    expect(report?.previousVersion).toBeNull();
    expect(report?.nextVersion?.id).toBe(ids.revision);
    expect(report?.shardCount).toBe(3);
    expect(report?.summary).toEqual(withVerdict("no-clear-winner"));
    const revision = await findReport(team.workspaceId, ids.revision);
    expect(revision?.previousVersion?.id).toBe(ids.first);
    expect(revision?.nextVersion).toBeNull();
  });

  it("finds nothing of another workspace, whichever query asks", async () => {
    expect(await findReport(team.workspaceId, ids.foreign)).toBeUndefined();
    expect(await findReportSummary(team.workspaceId, ids.foreign)).toBeUndefined();
    expect(await findReportShardTable(team.workspaceId, ids.foreign)).toBeUndefined();
  });
});

describe("findShardPage", () => {
  // Penguins (vega-datasets) dealt to 250 colonies by a partition map: more than two pages of 100.
  let colonies: PartitionSummary;
  let reportId: string;
  let owner: Awaited<ReturnType<typeof createAccount>>;
  beforeAll(async () => {
    colonies = await analyzePenguinColoniesWithCli(250);
    owner = await createAccount("colonies");
    ({ reportId } = await insertReport({
      workspaceId: owner.workspaceId,
      authorId: owner.id,
      summary: colonies,
    }));
  });

  it("gives the report page the summary without reading it whole: its charts come out as from every shard", async () => {
    // Stored without its shards (a few kB whatever the report's size), the summary comes back
    // with the shards its charts draw: above 200, the 40 most divergent by TV and by JS.
    const [stored] = await db()
      .select({ header: reports.summaryHeader })
      .from(reports)
      .where(eq(reports.id, reportId));
    expect(stored.header).toEqual({ ...colonies, shards: [] });
    const report = await findReport(owner.workspaceId, reportId);
    expect(report?.shardCount).toBe(250);
    const chartShards = report!.summary.shards;
    expect(chartShards.length).toBeGreaterThanOrEqual(TOP_CHART_SHARDS);
    expect(chartShards.length).toBeLessThanOrEqual(2 * TOP_CHART_SHARDS);
    expect(report!.summary).toEqual({ ...colonies, shards: chartShards });
    // Each shard as the CLI printed it, label counts included, in the summary's order.
    const inOrder = colonies.shards.filter((shard) => chartShards.some((s) => s.id === shard.id));
    expect(chartShards).toEqual(inOrder);
    // Identity: the charts rank and cut the same shards from the selection as from all 250.
    expect(buildLabelMix(report!.summary, 30, 250)).toEqual(
      buildLabelMix(colonies, 30, colonies.shards.length),
    );
    expect(selectDivergenceCandidates(chartShards, TOP_CHART_SHARDS)).toEqual(
      selectDivergenceCandidates(colonies.shards, TOP_CHART_SHARDS),
    );
  });

  /**
   * The expected order, computed here from the CLI's JSON rather than by the database: a stable
   * sort of the summary's shards (code-point order of ids) on one figure, missing figures last.
   */
  function sortedIds(key: "tv" | "rows", descending: boolean): string[] {
    const value = (shard: PartitionSummary["shards"][number]) => shard[key];
    return [...colonies.shards]
      .sort((a, b) => {
        const missing = Number(Number.isNaN(value(a))) - Number(Number.isNaN(value(b)));
        return missing || (descending ? value(b) - value(a) : value(a) - value(b));
      })
      .map((shard) => shard.id);
  }

  it("gives page 2 of the table sorted by a figure, largest first, as the next 100 shards", async () => {
    const page = await findShardPage(reportId, {
      sort: "tv",
      descending: true,
      filter: "",
      page: 2,
    });
    expect(page.matching).toBe(250);
    expect(page.rows.map((row) => row.shardId)).toEqual(sortedIds("tv", true).slice(100, 200));
    const byId = new Map(colonies.shards.map((shard) => [shard.id, shard]));
    for (const row of page.rows) expect(row.tv).toBe(byId.get(row.shardId)?.tv);
  });

  it("keeps the sort on the last page, smallest first, and in the summary's id order", async () => {
    const last = await findShardPage(reportId, {
      sort: "rows",
      descending: false,
      filter: "",
      page: 3,
    });
    expect(last.rows.map((row) => row.shardId)).toEqual(sortedIds("rows", false).slice(200));
    // Code-point order, not the database's collation: colony-10 comes before colony-2.
    const byId = await findShardPage(reportId, {
      sort: "shardId",
      descending: false,
      filter: "",
      page: 1,
    });
    const codePointOrder = colonies.shards.map((shard) => shard.id);
    expect(byId.rows.map((row) => row.shardId)).toEqual(codePointOrder.slice(0, 100));
  });

  it("filters ids case-insensitively before cutting pages", async () => {
    const page = await findShardPage(reportId, {
      sort: "shardId",
      descending: true,
      filter: "COLONY-24",
      page: 1,
    });
    // colony-24 and colony-240 … colony-249.
    expect(page.matching).toBe(11);
    expect(page.rows.map((row) => row.shardId)).toEqual([
      "colony-249",
      "colony-248",
      "colony-247",
      "colony-246",
      "colony-245",
      "colony-244",
      "colony-243",
      "colony-242",
      "colony-241",
      "colony-240",
      "colony-24",
    ]);
  });
});

describe("listReportAuthors", () => {
  it("names each author once", async () => {
    const authors = await listReportAuthors(team.workspaceId);
    expect(authors.map((author) => author.id).sort()).toEqual(
      [team.analyst.id, team.owner.id].sort(),
    );
  });
});
