import "server-only";
import { and, eq, sql } from "drizzle-orm";
import { db } from "@/db/client";
import { analyses, federatedAnalyses } from "@/db/schema";
import type { PartitionSummary } from "@/lib/analysis";
import type { AnalysisOptionsInput } from "@/lib/validation/analysis-options";
import { notifyFederatedState } from "./federated-notices";
import { insertReportWithShards, nextVersionOf } from "./report-store";

export interface FinishedFederatedRun {
  federatedAnalysisId: string;
  summary: PartitionSummary;
  /** The options as a file analysis would record them, so the report reads like any other. */
  parameters: AnalysisOptionsInput;
  timings: Record<string, number>;
}

type StoredOutcome = { stored: true; reportId: string } | { stored: false };

/**
 * Stores a federated analysis's merged summary as a normal report, in one transaction: an
 * analyses row without a dataset file (reports belong to analyses), the report in the lineage of
 * the report it revises, its per-shard table, and the federated analysis marked done. The
 * federated row is locked first, so a retried coordinator stores nothing twice.
 */
export async function storeFederatedReport(run: FinishedFederatedRun): Promise<StoredOutcome> {
  const outcome = await db().transaction(async (tx): Promise<StoredOutcome> => {
    const [federated] = await tx
      .select()
      .from(federatedAnalyses)
      .where(eq(federatedAnalyses.id, run.federatedAnalysisId))
      .for("update");
    if (!federated || federated.state === "done" || federated.state === "failed") {
      return { stored: false };
    }
    const [analysis] = await tx
      .insert(analyses)
      .values({
        workspaceId: federated.workspaceId,
        title: federated.title,
        datasetFileId: null,
        parameters: run.parameters,
        previousReportId: federated.previousReportId,
        status: "succeeded",
        fraction: 1,
        createdBy: federated.createdBy,
        startedAt: federated.createdAt,
        finishedAt: sql`now()`,
      })
      .returning({ id: analyses.id });
    const reportId = crypto.randomUUID();
    const lineage = federated.previousReportId
      ? await nextVersionOf(tx, federated.workspaceId, federated.previousReportId)
      : { lineageId: reportId, version: 1 };
    await insertReportWithShards(tx, {
      id: reportId,
      workspaceId: federated.workspaceId,
      analysisId: analysis.id,
      lineageId: lineage.lineageId,
      version: lineage.version,
      previousReportId: federated.previousReportId,
      title: federated.title,
      summary: run.summary,
      parameters: run.parameters,
      // No file was read: what each client sent is in the summary's `digests`.
      inputs: [],
      timings: run.timings,
      authorId: federated.createdBy,
    });
    await tx
      .update(federatedAnalyses)
      .set({ state: "done", analysisId: analysis.id, reportId, finishedAt: sql`now()` })
      .where(
        and(
          eq(federatedAnalyses.id, federated.id),
          eq(federatedAnalyses.workspaceId, federated.workspaceId),
        ),
      );
    return { stored: true, reportId };
  });
  // After the commit, so a woken client reads the report's id.
  if (outcome.stored) await notifyFederatedState(run.federatedAnalysisId);
  return outcome;
}
