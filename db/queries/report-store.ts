import "server-only";
import { and, eq, max, sql } from "drizzle-orm";
import { db } from "@/db/client";
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
    const [report] = await tx
      .insert(reports)
      .values({
        id: reportId,
        workspaceId: run.workspaceId,
        analysisId: analysis.id,
        lineageId: lineage.lineageId,
        version: lineage.version,
        previousReportId: analysis.previousReportId,
        title: analysis.title,
        verdict: run.summary.advice.verdict,
        summary: run.summary,
        parameters: analysis.parameters,
        inputs: run.inputs,
        engineVersion: run.summary.engineVersion,
        timings: run.timings,
        authorId: analysis.createdBy,
      })
      .onConflictDoNothing({ target: reports.analysisId })
      .returning({ id: reports.id });
    if (!report) return { stored: false, status: "succeeded" };

    if (run.summary.shards.length > 0) {
      await tx.insert(reportShards).values(shardRowsOf(reportId, run.summary.shards));
    }
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

type Transaction = Parameters<Parameters<ReturnType<typeof db>["transaction"]>[0]>[0];

/**
 * The lineage and next version for a revision of `previousReportId`. The lineage's first report is
 * locked so two revisions finishing at once take consecutive versions instead of colliding; the
 * version follows the highest in the lineage, so revising an older version never reuses a number.
 */
async function nextVersionOf(
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

/** The per-shard table rows of a report, in the summary's shard order. */
export function shardRowsOf(
  reportId: string,
  shards: PartitionSummary["shards"],
): (typeof reportShards.$inferInsert)[] {
  return shards.map((shard, ordinal) => ({
    reportId,
    ordinal,
    shardId: shard.id,
    rows: shard.rows,
    tv: shard.tv,
    hellinger: shard.hellinger,
    js: shard.js,
    kl: shard.kl,
    gradNorm2: shard.gradNorm2,
    sigma2: shard.sigma2,
    loss: shard.loss,
    classesPresent: shard.classesPresent,
    effectiveClasses: shard.effectiveClasses,
    featureShift: shard.featureShift,
  }));
}
