import "server-only";
import {
  and,
  asc,
  count,
  desc,
  eq,
  getTableColumns,
  gte,
  ilike,
  inArray,
  lt,
  sql,
  type SQL,
} from "drizzle-orm";
import { db } from "@/db/client";
import { reports, reportShards, users } from "@/db/schema";
import type { PartitionSummary, ShardSummary } from "@/lib/analysis";
import { ALL_CHART_SHARDS, TOP_CHART_SHARDS } from "@/lib/reports/chart-shards";
import { encodeReportCursor, type ReportCursor } from "@/lib/reports/report-cursor";
import type { ReportFilters } from "@/lib/reports/report-filters";
import type { ShardTableRow } from "@/lib/reports/shard-table";
import { SHARD_PAGE_SIZE, type ShardTableView } from "@/lib/reports/shard-table-view";

const authorName = sql<string>`coalesce(${users.name}, ${users.email})`;

/** Newest version in the report's lineage, to tell a reader when a revision exists. */
const latestVersion = sql<number>`(
  select max(later.version) from ${reports} as later
  where later.lineage_id = ${reports.lineageId} and later.workspace_id = ${reports.workspaceId}
)`.mapWith(Number);

export type ReportListItem = {
  id: string;
  title: string;
  verdict: (typeof reports.$inferSelect)["verdict"];
  version: number;
  latestVersion: number;
  lineageId: string;
  createdAt: Date;
  authorId: string;
  authorName: string;
  /** ρ = local / minibatch bound. */
  ratio: number | null;
  datasetRows: number;
  shardCount: number;
};

/** A LIKE pattern that matches `text` literally anywhere. */
function containsPattern(text: string): string {
  return `%${text.replace(/[\\%_]/g, (match) => `\\${match}`)}%`;
}

function filterConditions(workspaceId: string, filters: ReportFilters): SQL[] {
  const conditions = [eq(reports.workspaceId, workspaceId)];
  if (filters.verdict) conditions.push(eq(reports.verdict, filters.verdict));
  if (filters.q) conditions.push(ilike(reports.title, containsPattern(filters.q)));
  if (filters.author) conditions.push(eq(reports.authorId, filters.author));
  if (filters.from) conditions.push(gte(reports.createdAt, new Date(`${filters.from}T00:00:00Z`)));
  if (filters.to) {
    const dayAfter = new Date(`${filters.to}T00:00:00Z`);
    dayAfter.setUTCDate(dayAfter.getUTCDate() + 1);
    conditions.push(lt(reports.createdAt, dayAfter));
  }
  return conditions;
}

/** A workspace's newest reports matching the filters (dates are whole UTC days, inclusive). */
export async function listReports(
  workspaceId: string,
  filters: ReportFilters = {},
  limit = 100,
): Promise<ReportListItem[]> {
  return (await selectReportRows(workspaceId, filters, limit)).map((row) => row.report);
}

/**
 * Newest first, starting after `after` when given. Ties on the creation time are broken by version
 * and id, so the order is total and a cursor never skips or repeats a report.
 */
async function selectReportRows(
  workspaceId: string,
  filters: ReportFilters,
  limit: number,
  after?: ReportCursor,
): Promise<{ report: ReportListItem; cursor: ReportCursor }[]> {
  const conditions = filterConditions(workspaceId, filters);
  if (after) {
    conditions.push(
      sql`(${reports.createdAt}, ${reports.version}, ${reports.id}) < (${after.createdAt}::timestamptz, ${after.version}, ${after.id})`,
    );
  }
  const rows = await db()
    .select({
      id: reports.id,
      title: reports.title,
      verdict: reports.verdict,
      version: reports.version,
      latestVersion,
      lineageId: reports.lineageId,
      createdAt: reports.createdAt,
      authorId: reports.authorId,
      authorName,
      // Columns of their own: the summary is never read here (see the schema).
      ratio: reports.ratio,
      datasetRows: reports.datasetRows,
      shardCount: reports.shardCount,
      exactCreatedAt: sql<string>`${reports.createdAt}::text`,
    })
    .from(reports)
    .innerJoin(users, eq(users.id, reports.authorId))
    .where(and(...conditions))
    .orderBy(desc(reports.createdAt), desc(reports.version), desc(reports.id))
    .limit(limit);
  return rows.map(({ exactCreatedAt, ...report }) => ({
    report,
    cursor: { createdAt: exactCreatedAt, version: report.version, id: report.id },
  }));
}

/** One page of the reports list and the cursor of the next, null on the last page. */
export async function listReportPage(
  workspaceId: string,
  filters: ReportFilters,
  limit: number,
  after?: ReportCursor,
): Promise<{ reports: ReportListItem[]; nextCursor: string | null }> {
  // One more than shown tells whether a next page exists without counting the whole list.
  const rows = await selectReportRows(workspaceId, filters, limit + 1, after);
  return {
    reports: rows.slice(0, limit).map((row) => row.report),
    nextCursor: rows.length > limit ? encodeReportCursor(rows[limit - 1].cursor) : null,
  };
}

/** People who wrote at least one report in the workspace, for the author filter. */
export async function listReportAuthors(
  workspaceId: string,
): Promise<{ id: string; name: string }[]> {
  return db()
    .selectDistinct({ id: users.id, name: authorName })
    .from(reports)
    .innerJoin(users, eq(users.id, reports.authorId))
    .where(eq(reports.workspaceId, workspaceId))
    .orderBy(authorName);
}

export type ReportVersion = {
  id: string;
  version: number;
  verdict: ReportListItem["verdict"];
  createdAt: Date;
};

export type ReportDetail = Omit<typeof reports.$inferSelect, "summaryHeader"> & {
  /**
   * The summary with the shards its charts draw (not the stored whole, which is megabytes at
   * 100,000 shards): every shard up to ALL_CHART_SHARDS, else the TOP_CHART_SHARDS most divergent
   * by TV and by JS, in stored order. `shardCount` counts them all; the per-shard table pages
   * through report_shards.
   */
  summary: PartitionSummary;
  authorName: string;
  /** Every version in the lineage, oldest first (this one included). */
  versions: ReportVersion[];
  previousVersion: ReportVersion | null;
  nextVersion: ReportVersion | null;
};

const shardColumns = {
  shardId: reportShards.shardId,
  rows: reportShards.rows,
  tv: reportShards.tv,
  hellinger: reportShards.hellinger,
  js: reportShards.js,
  kl: reportShards.kl,
  gradNorm2: reportShards.gradNorm2,
  sigma2: reportShards.sigma2,
  loss: reportShards.loss,
  classesPresent: reportShards.classesPresent,
  effectiveClasses: reportShards.effectiveClasses,
  featureShift: reportShards.featureShift,
};

/** Every column of a report but the whole summary, which the page never parses. */
function reportColumnsButSummary() {
  const columns: Partial<ReturnType<typeof getTableColumns<typeof reports>>> = {
    ...getTableColumns(reports),
  };
  delete columns.summary;
  return columns as Omit<ReturnType<typeof getTableColumns<typeof reports>>, "summary">;
}

/** One report of the workspace with its lineage, or undefined. */
export async function findReport(
  workspaceId: string,
  reportId: string,
): Promise<ReportDetail | undefined> {
  const [row] = await db()
    .select({ report: reportColumnsButSummary(), authorName })
    .from(reports)
    .innerJoin(users, eq(users.id, reports.authorId))
    .where(and(eq(reports.workspaceId, workspaceId), eq(reports.id, reportId)));
  if (!row) return undefined;
  const { summaryHeader, ...report } = row.report;
  const [versions, chartShards] = await Promise.all([
    listLineageVersions(workspaceId, report.lineageId),
    findChartShards(reportId, report.shardCount),
  ]);
  const position = versions.findIndex((version) => version.id === reportId);
  return {
    ...report,
    summary: { ...summaryHeader, shards: chartShards },
    authorName: row.authorName,
    versions,
    previousVersion: versions[position - 1] ?? null,
    nextVersion: versions[position + 1] ?? null,
  };
}

function listLineageVersions(workspaceId: string, lineageId: string): Promise<ReportVersion[]> {
  return db()
    .select({
      id: reports.id,
      version: reports.version,
      verdict: reports.verdict,
      createdAt: reports.createdAt,
    })
    .from(reports)
    .where(and(eq(reports.workspaceId, workspaceId), eq(reports.lineageId, lineageId)))
    .orderBy(asc(reports.version));
}

/**
 * The shards a report's charts draw, from its shard table in stored order: all of them up to
 * ALL_CHART_SHARDS; else the TOP_CHART_SHARDS largest by TV and by JS (missing figures last, ties
 * in stored order), which hold the most divergent shards every chart ranks, so the charts come out
 * as from all shards.
 */
async function findChartShards(reportId: string, shardCount: number): Promise<ShardSummary[]> {
  const ofReport = eq(reportShards.reportId, reportId);
  let chosen: SQL | undefined;
  if (shardCount > ALL_CHART_SHARDS) {
    const largest = (column: typeof reportShards.tv | typeof reportShards.js) =>
      db()
        .select({ ordinal: reportShards.ordinal })
        .from(reportShards)
        .where(ofReport)
        .orderBy(sql`${column} = 'NaN'::float8`, desc(column), asc(reportShards.ordinal))
        .limit(TOP_CHART_SHARDS);
    const [byTv, byJs] = await Promise.all([largest(reportShards.tv), largest(reportShards.js)]);
    chosen = inArray(reportShards.ordinal, [
      ...new Set([...byTv, ...byJs].map((row) => row.ordinal)),
    ]);
  }
  const rows = await db()
    .select({ ...shardColumns, labelCounts: reportShards.labelCounts })
    .from(reportShards)
    .where(and(ofReport, chosen))
    .orderBy(asc(reportShards.ordinal));
  return rows.map(({ shardId, ...figures }) => ({ id: shardId, ...figures }));
}

export interface ShardPage {
  rows: ShardTableRow[];
  /** Shards whose id matches the view's filter (all of them without one). */
  matching: number;
}

/**
 * One page of a report's per-shard table, sorted and filtered by the database so a page costs the
 * same at 100,000 shards as at three. Missing figures (NaN) sort last in either direction; ties
 * and the shard-id sort follow the summary's order (code-point order of the ids, methods.md §1),
 * not the database's collation.
 */
export async function findShardPage(reportId: string, view: ShardTableView): Promise<ShardPage> {
  const conditions = [eq(reportShards.reportId, reportId)];
  if (view.filter) {
    conditions.push(sql`strpos(lower(${reportShards.shardId}), lower(${view.filter})) > 0`);
  }
  const ordering: SQL[] = [];
  if (view.sort !== "shardId") {
    const column = reportShards[view.sort];
    ordering.push(
      sql`${column}::float8 = 'NaN'::float8`,
      view.descending ? desc(column) : asc(column),
    );
  }
  ordering.push(
    view.sort === "shardId" && view.descending
      ? desc(reportShards.ordinal)
      : asc(reportShards.ordinal),
  );
  const where = and(...conditions);
  const [rows, [{ matching }]] = await Promise.all([
    db()
      .select(shardColumns)
      .from(reportShards)
      .where(where)
      .orderBy(...ordering)
      .limit(SHARD_PAGE_SIZE)
      .offset((view.page - 1) * SHARD_PAGE_SIZE),
    db().select({ matching: count() }).from(reportShards).where(where),
  ]);
  return { rows, matching };
}

/** Every shard id of a report in the summary's order, when it has at most `limit` shards. */
export async function listShardIds(reportId: string, limit: number): Promise<string[] | null> {
  const rows = await db()
    .select({ shardId: reportShards.shardId })
    .from(reportShards)
    .where(eq(reportShards.reportId, reportId))
    .orderBy(asc(reportShards.ordinal))
    .limit(limit + 1);
  return rows.length > limit ? null : rows.map((row) => row.shardId);
}

/** The stored summary for the JSON export, or undefined outside the workspace. */
export async function findReportSummary(workspaceId: string, reportId: string) {
  const [row] = await db()
    .select({
      title: reports.title,
      version: reports.version,
      summary: reports.summary,
      inputs: reports.inputs,
      parameters: reports.parameters,
    })
    .from(reports)
    .where(and(eq(reports.workspaceId, workspaceId), eq(reports.id, reportId)));
  return row;
}

/** The per-shard table for the CSV export, or undefined outside the workspace. */
export async function findReportShardTable(
  workspaceId: string,
  reportId: string,
): Promise<
  | {
      title: string;
      version: number;
      task: PartitionSummary["dataset"]["task"];
      shards: ShardTableRow[];
    }
  | undefined
> {
  const [report] = await db()
    .select({
      title: reports.title,
      version: reports.version,
      task: sql<PartitionSummary["dataset"]["task"]>`${reports.summaryHeader}->'dataset'->>'task'`,
    })
    .from(reports)
    .where(and(eq(reports.workspaceId, workspaceId), eq(reports.id, reportId)));
  if (!report) return undefined;
  const shards = await db()
    .select(shardColumns)
    .from(reportShards)
    .where(eq(reportShards.reportId, reportId))
    .orderBy(asc(reportShards.ordinal));
  return { ...report, shards };
}
