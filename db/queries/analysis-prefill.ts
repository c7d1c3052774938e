import "server-only";
import { and, eq, isNotNull } from "drizzle-orm";
import { db } from "@/db/client";
import { analyses, layoutCandidates, layoutPlans, reports } from "@/db/schema";
import type { AnalysisOptionsInput } from "@/lib/validation/analysis-options";

/** What the new-analysis form needs of an earlier analysis to fill itself in. */
export type AnalysisForForm = {
  title: string;
  datasetFileId: string;
  layoutFileId: string | null;
  weightsFileId: string | null;
  parameters: AnalysisOptionsInput;
};

const formColumns = {
  title: analyses.title,
  datasetFileId: analyses.datasetFileId,
  layoutFileId: analyses.layoutFileId,
  weightsFileId: analyses.weightsFileId,
  parameters: analyses.parameters,
};

// A federated analysis has no dataset file to read again (its report was merged from client
// digests), so the file form cannot start from it: both look-ups pass it by.

/** An analysis of this workspace as the form's starting point ("run again"), or undefined. */
export async function findAnalysisForForm(
  workspaceId: string,
  analysisId: string,
): Promise<AnalysisForForm | undefined> {
  const [row] = await db()
    .select(formColumns)
    .from(analyses)
    .where(
      and(
        eq(analyses.workspaceId, workspaceId),
        eq(analyses.id, analysisId),
        isNotNull(analyses.datasetFileId),
      ),
    );
  return row && { ...row, datasetFileId: row.datasetFileId as string };
}

/** The analysis behind a report of this workspace, to revise it with other parameters. */
export async function findReportAnalysisForForm(
  workspaceId: string,
  reportId: string,
): Promise<AnalysisForForm | undefined> {
  const [row] = await db()
    .select(formColumns)
    .from(reports)
    .innerJoin(analyses, eq(analyses.id, reports.analysisId))
    .where(
      and(
        eq(reports.workspaceId, workspaceId),
        eq(reports.id, reportId),
        isNotNull(analyses.datasetFileId),
      ),
    );
  return row && { ...row, datasetFileId: row.datasetFileId as string };
}

/**
 * A layout plan's candidate whose map was registered as a layout file ("Analyse this layout"): the
 * plan's dataset and options with the map as the partition.
 */
export async function findLayoutCandidateForForm(
  workspaceId: string,
  planId: string,
  ordinal: number,
): Promise<AnalysisForForm | undefined> {
  const [row] = await db()
    .select({
      title: layoutPlans.title,
      name: layoutCandidates.name,
      datasetFileId: layoutPlans.datasetFileId,
      layoutFileId: layoutCandidates.mapFileId,
      parameters: layoutPlans.options,
    })
    .from(layoutCandidates)
    .innerJoin(layoutPlans, eq(layoutPlans.id, layoutCandidates.planId))
    .where(
      and(
        eq(layoutPlans.workspaceId, workspaceId),
        eq(layoutPlans.id, planId),
        eq(layoutCandidates.ordinal, ordinal),
      ),
    );
  if (!row?.layoutFileId) return undefined;
  return {
    title: `${row.title} · ${row.name}`,
    datasetFileId: row.datasetFileId,
    layoutFileId: row.layoutFileId,
    weightsFileId: null,
    parameters: row.parameters,
  };
}
