import "server-only";
import { and, eq, max, sql } from "drizzle-orm";
import { db, type Database } from "@/db/client";
import { analyses, reports, reportShards, type ReportInput } from "@/db/schema";
import type { PartitionSummary } from "@/lib/analysis";

export interface FinishedRun {
  workspaceId: string;
  analysisId: string;
  summary: PartitionSummary;
  inputs: ReportInput[];
  /** Seconds per engine stage, plus `total`. */
  timings: Record<string, number>;
}

export type StoreOutcome =
  | { stored: true; reportId: string }
  /** The analysis was cancelled, or another run of it already stored its report. */
  | { stored: false; status: (typeof analyses.$inferSelect)["status"] };

/**
 * Stores the report of a finished run and marks its analysis succeeded, all in one transaction.
 * The analysis row is locked first: a cancellation that landed while the engine ran wins (nothing
 * is stored), and of two runs of the same analysis (a retried job whose first worker was only
 * slow) the second finds it succeeded and stores nothing; the unique analysis id on reports
 * guards the same from the database's side. A re-run of an earlier report continues its lineage
 * with the next version.
 */
export async function storeReport(run: FinishedRun): Promise<StoreOutcome> {
  return db().transaction(async (tx) => {
    const [analysis] = await tx
      .select()
      .from(analyses)
      .where(and(eq(analyses.workspaceId, run.workspaceId), eq(analyses.id, run.analysisId)))
      .for("update");
    if (!analysis) throw new Error(`analysis ${run.analysisId} is gone`);
    if (analysis.status !== "running") return { stored: false, status: analysis.status };

    const reportId = crypto.randomUUID();
    const lineage = analysis.previousReportId
      ? await nextVersionOf(tx, run.workspaceId, analysis.previousReportId)
      : { lineageId: reportId, version: 1 };
    const stored = await insertReportWithShards(tx, {
      id: reportId,
      workspaceId: run.workspaceId,
      analysisId: analysis.id,
      lineageId: lineage.lineageId,
      version: lineage.version,
      previousReportId: analysis.previousReportId,
      title: analysis.title,
      summary: run.summary,
      parameters: analysis.parameters,
      inputs: run.inputs,
      timings: run.timings,
      authorId: analysis.createdBy,
    });
    if (!stored) return { stored: false, status: "succeeded" };

    await tx
      .update(analyses)
      .set({
        status: "succeeded",
        stage: null,
        fraction: 1,
        failureMessage: null,
        finishedAt: sql`now()`,
      })
      .where(eq(analyses.id, analysis.id));
    return { stored: true, reportId };
  });
}

/** A report as its writers give it: what the list and the page read is derived from `summary`. */
export type NewReport = Omit<
  typeof reports.$inferInsert,
  "summaryHeader" | "engineVersion" | keyof ReturnType<typeof listFiguresOf>
> & { id: string; summary: PartitionSummary };

/**
 * Inserts a report with its list figures, its page header and its per-shard rows, all derived
 * from the summary here so no writer can store one without the others. False when the analysis
 * already has its report (a retried run that finished second).
 */
export async function insertReportWithShards(
  tx: Pick<Database, "insert" | "execute">,
  report: NewReport,
): Promise<boolean> {
  const [row] = await tx
    .insert(reports)
    .values({
      ...report,
      ...listFiguresOf(report.summary),
      summaryHeader: summaryHeaderOf(report.summary),
      engineVersion: report.summary.engineVersion,
    })
    .onConflictDoNothing({ target: reports.analysisId })
    .returning({ id: reports.id });
  if (!row) return false;
  await insertShardRows(tx, report.id, report.summary.shards);
  return true;
}

/** The columns the reports list shows from a summary: its verdict and figures. */
function listFiguresOf(summary: PartitionSummary) {
  return {
    verdict: summary.advice.verdict,
    ratio: summary.advice.ratio,
    datasetRows: summary.dataset.rows,
    shardCount: summary.shards.length,
  };
}

/** The summary as the report page reads it: without the per-shard array (report_shards holds it). */
function summaryHeaderOf(summary: PartitionSummary): PartitionSummary {
  return { ...summary, shards: [] };
}

export type Transaction = Parameters<Parameters<ReturnType<typeof db>["transaction"]>[0]>[0];

/**
 * The lineage and next version for a revision of `previousReportId`. The lineage's first report is
 * locked so two revisions finishing at once take consecutive versions instead of colliding; the
 * version follows the highest in the lineage, so revising an older version never reuses a number.
 */
export async function nextVersionOf(
  tx: Transaction,
  workspaceId: string,
  previousReportId: string,
): Promise<{ lineageId: string; version: number }> {
  const [previous] = await tx
    .select({ lineageId: reports.lineageId })
    .from(reports)
    .where(and(eq(reports.workspaceId, workspaceId), eq(reports.id, previousReportId)));
  if (!previous) throw new Error(`report ${previousReportId} is not in workspace ${workspaceId}`);
  await tx
    .select({ id: reports.id })
    .from(reports)
    .where(eq(reports.id, previous.lineageId))
    .for("update");
  const [{ highest }] = await tx
    .select({ highest: max(reports.version) })
    .from(reports)
    .where(eq(reports.lineageId, previous.lineageId));
  return { lineageId: previous.lineageId, version: (highest ?? 0) + 1 };
}

/**
 * Shard rows per INSERT. Each statement sends one array per column (unnest), so its parameter count
 * stays at 15 whatever the batch; the batch only bounds the size of one statement's arrays.
 */
const SHARD_ROWS_PER_INSERT = 10_000;

/**
 * Writes a report's per-shard table. One parameter per value would pass PostgreSQL's limit of
 * 65,535 parameters a statement at about 4,370 shards (15 columns), and a federated population
 * has far more clients: each column goes as one array parameter and `unnest` turns the arrays
 * back into rows. pg sends numbers in their shortest round-trip form, so doubles arrive exactly.
 */
async function insertShardRows(
  tx: Pick<Database, "execute">,
  reportId: string,
  shards: PartitionSummary["shards"],
): Promise<void> {
  for (let start = 0; start < shards.length; start += SHARD_ROWS_PER_INSERT) {
    const batch = shards.slice(start, start + SHARD_ROWS_PER_INSERT);
    const column = <T>(read: (shard: PartitionSummary["shards"][number]) => T) =>
      sql.param(batch.map(read));
    await tx.execute(sql`
      insert into ${reportShards} (
        report_id, ordinal, shard_id, rows, tv, hellinger, js, kl, grad_norm2, sigma2, loss,
        classes_present, effective_classes, feature_shift, label_counts
      )
      select ${reportId}, ${start}::int + position::int - 1, shard_id, rows, tv, hellinger, js,
        kl, grad_norm2, sigma2, loss, classes_present, effective_classes, feature_shift,
        label_counts::json
      from unnest(
          ${column((shard) => shard.id)}::text[],
          ${column((shard) => shard.rows)}::int[],
          ${column((shard) => shard.tv)}::float8[],
          ${column((shard) => shard.hellinger)}::float8[],
          ${column((shard) => shard.js)}::float8[],
          ${column((shard) => shard.kl)}::float8[],
          ${column((shard) => shard.gradNorm2)}::float8[],
          ${column((shard) => shard.sigma2)}::float8[],
          ${column((shard) => shard.loss)}::float8[],
          ${column((shard) => shard.classesPresent)}::int[],
          ${column((shard) => shard.effectiveClasses)}::float8[],
          ${column((shard) => shard.featureShift)}::float8[],
          ${column((shard) => JSON.stringify(shard.labelCounts))}::text[]
        ) with ordinality as shard(
          shard_id, rows, tv, hellinger, js, kl, grad_norm2, sigma2, loss, classes_present,
          effective_classes, feature_shift, label_counts, position
        )
    `);
  }
}
