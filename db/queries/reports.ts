import "server-only";
import { and, asc, desc, eq, gte, ilike, lt, sql, type SQL } from "drizzle-orm";
import { db } from "@/db/client";
import { reports, reportShards, users } from "@/db/schema";
import type { ReportFilters } from "@/lib/reports/report-filters";
import type { ShardTableRow } from "@/lib/reports/shard-table";

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

/** A workspace's reports matching the filters, newest first (dates are whole UTC days, inclusive). */
export async function listReports(
  workspaceId: string,
  filters: ReportFilters = {},
  limit = 100,
): Promise<ReportListItem[]> {
  return db()
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
    })
    .from(reports)
    .innerJoin(users, eq(users.id, reports.authorId))
    .where(and(...filterConditions(workspaceId, filters)))
    .orderBy(desc(reports.createdAt), desc(reports.version))
    .limit(limit);
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

export type ReportDetail = typeof reports.$inferSelect & {
  authorName: string;
  /** Every version in the lineage, oldest first (this one included). */
  versions: ReportVersion[];
  previousVersion: ReportVersion | null;
  nextVersion: ReportVersion | null;
  shards: ShardTableRow[];
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

/** One report of the workspace with its lineage and per-shard table, or undefined. */
export async function findReport(
  workspaceId: string,
  reportId: string,
): Promise<ReportDetail | undefined> {
  const [row] = await db()
    .select({ report: reports, authorName })
    .from(reports)
    .innerJoin(users, eq(users.id, reports.authorId))
    .where(and(eq(reports.workspaceId, workspaceId), eq(reports.id, reportId)));
  if (!row) return undefined;
  const [versions, shards] = await Promise.all([
    db()
      .select({
        id: reports.id,
        version: reports.version,
        verdict: reports.verdict,
        createdAt: reports.createdAt,
      })
      .from(reports)
      .where(and(eq(reports.workspaceId, workspaceId), eq(reports.lineageId, row.report.lineageId)))
      .orderBy(asc(reports.version)),
    db()
      .select(shardColumns)
      .from(reportShards)
      .where(eq(reportShards.reportId, reportId))
      .orderBy(asc(reportShards.ordinal)),
  ]);
  const position = versions.findIndex((version) => version.id === reportId);
  return {
    ...row.report,
    authorName: row.authorName,
    versions,
    previousVersion: versions[position - 1] ?? null,
    nextVersion: versions[position + 1] ?? null,
    shards,
  };
}

/** The stored summary for the JSON export, or undefined outside the workspace. */
export async function findReportSummary(workspaceId: string, reportId: string) {
  const [row] = await db()
    .select({ title: reports.title, version: reports.version, summary: reports.summary })
    .from(reports)
    .where(and(eq(reports.workspaceId, workspaceId), eq(reports.id, reportId)));
  return row;
}

/** The per-shard table for the CSV export, or undefined outside the workspace. */
export async function findReportShardTable(
  workspaceId: string,
  reportId: string,
): Promise<{ title: string; version: number; shards: ShardTableRow[] } | undefined> {
  const [report] = await db()
    .select({ title: reports.title, version: reports.version })
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
