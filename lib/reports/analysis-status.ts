import type { AnalysisStatusView } from "@/db/queries/analyses";
import type { AnalysisStage } from "@/lib/analysis";

/** What GET /api/workspaces/[workspaceId]/analyses/[analysisId] answers. */
export interface AnalysisStatusJson {
  status: AnalysisStatusView["status"];
  stage: AnalysisStage | null;
  /** Progress within `stage`, 0 to 1. */
  fraction: number;
  /** Written for the user: the engine's message about the input, or a plain internal-error note. */
  failureMessage: string | null;
  attempts: number;
  reportId: string | null;
  title: string;
  /** ISO 8601 times. */
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
}

export function toStatusJson(view: AnalysisStatusView): AnalysisStatusJson {
  return {
    status: view.status,
    // Only the worker writes the stage, and only the engine's stage names.
    stage: view.stage as AnalysisStage | null,
    fraction: view.fraction,
    failureMessage: view.failureMessage,
    attempts: view.attempts,
    reportId: view.reportId,
    title: view.title,
    createdAt: view.createdAt.toISOString(),
    startedAt: view.startedAt?.toISOString() ?? null,
    finishedAt: view.finishedAt?.toISOString() ?? null,
  };
}

/** The engine's stages in order, as the progress page names them. */
export const STAGE_LABELS: Record<AnalysisStage, string> = {
  reading: "Reading the dataset and partition map",
  encoding: "Encoding the features",
  fitting: "Fitting the reference model",
  measuring: "Measuring how the shards differ",
  advising: "Weighing local updates against minibatches",
};

/**
 * Each stage's share of the progress bar, close to its share of the time on the 100 000-row
 * benchmark (`npm run bench`: fitting ≈ 75 %), so the bar moves at a roughly steady pace instead
 * of racing through the quick stages and stalling on the fit.
 */
const STAGE_SHARES: Record<AnalysisStage, number> = {
  reading: 0.12,
  encoding: 0.08,
  fitting: 0.68,
  measuring: 0.1,
  advising: 0.02,
};

const STAGES = Object.keys(STAGE_LABELS) as AnalysisStage[];

/** Overall progress from 0 to 1 from the current stage and the fraction done within it. */
export function overallFraction(stage: AnalysisStage | null, fraction: number): number {
  if (stage === null) return 0;
  const before = STAGES.slice(0, STAGES.indexOf(stage)).reduce(
    (sum, earlier) => sum + STAGE_SHARES[earlier],
    0,
  );
  return Math.min(1, before + STAGE_SHARES[stage] * Math.min(1, Math.max(0, fraction)));
}

export function isFinished(status: AnalysisStatusJson["status"]): boolean {
  return status === "succeeded" || status === "failed" || status === "cancelled";
}
