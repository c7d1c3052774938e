"use server";

import {
  cancelQueuedOrRunning,
  deleteUnqueuedAnalysis,
  findInputFiles,
  insertAnalysis,
  reportExists,
  setAnalysisJobId,
  type AnalysisInputFile,
} from "@/db/queries/analyses";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { requireRole } from "@/lib/auth/guards";
import { RuleError } from "@/lib/errors";
import { enqueueAnalysis } from "@/lib/jobs";
import {
  startAnalysisSchema,
  type StartAnalysisInput,
  type StartAnalysisRequest,
} from "@/lib/validation/start-analysis";

const KIND_NAMES = {
  dataset: "a dataset",
  layout: "a partition map",
  weights: "reference weights",
};

type InputKind = keyof typeof KIND_NAMES;

/** One referenced file, checked to be in this workspace and of the kind its field needs. */
function checkInputFile(
  found: Map<string, AnalysisInputFile>,
  field: string,
  id: string,
  kind: InputKind,
): AnalysisInputFile {
  const file = found.get(id);
  if (!file)
    throw new RuleError(422, "That file is not in this workspace; upload it again.", field);
  if (file.kind !== kind) {
    throw new RuleError(
      422,
      `“${file.name}” was uploaded as ${KIND_NAMES[file.kind]}, not as ${KIND_NAMES[kind]}.`,
      field,
    );
  }
  return file;
}

async function resolveInputFiles(workspaceId: string, request: StartAnalysisRequest) {
  const ids = [request.datasetFileId, request.layoutFileId, request.weightsFileId];
  const found = new Map(
    (
      await findInputFiles(
        workspaceId,
        ids.filter((id): id is string => id !== undefined),
      )
    ).map((file) => [file.id, file]),
  );
  return {
    dataset: checkInputFile(found, "datasetFileId", request.datasetFileId, "dataset"),
    layout: request.layoutFileId
      ? checkInputFile(found, "layoutFileId", request.layoutFileId, "layout")
      : undefined,
    weights: request.weightsFileId
      ? checkInputFile(found, "weightsFileId", request.weightsFileId, "weights")
      : undefined,
  };
}

/**
 * Queues an analysis of registered files. Returns its id; the browser then follows its progress
 * at /w/[workspaceId]/analyses/[analysisId].
 */
export async function startAnalysis(
  workspaceId: string,
  input: StartAnalysisInput,
): Promise<ActionResult<{ analysisId: string }>> {
  try {
    const { user } = await requireRole(workspaceId, "runAnalysis");
    const request = startAnalysisSchema.parse(input);
    const files = await resolveInputFiles(workspaceId, request);
    if (request.previousReportId && !(await reportExists(workspaceId, request.previousReportId))) {
      throw new RuleError(
        422,
        "The report to revise is not in this workspace.",
        "previousReportId",
      );
    }
    const partitionName = files.layout?.name ?? request.options.shardColumn;
    const title = request.title || `${files.dataset.name} · ${partitionName}`;
    const analysisId = await insertAnalysis(workspaceId, user.id, { ...request, title });
    try {
      const jobId = await enqueueAnalysis({ analysisId, workspaceId });
      await setAnalysisJobId(workspaceId, analysisId, jobId);
    } catch (error) {
      await deleteUnqueuedAnalysis(workspaceId, analysisId);
      throw error;
    }
    return succeed({ analysisId });
  } catch (error) {
    return failWith(error, "start-analysis");
  }
}

/** Stops a queued or running analysis; its inputs stay, and nothing is stored for it. */
export async function cancelAnalysis(
  workspaceId: string,
  analysisId: string,
): Promise<ActionResult> {
  try {
    await requireRole(workspaceId, "runAnalysis");
    await cancelQueuedOrRunning(workspaceId, analysisId);
    return succeed();
  } catch (error) {
    return failWith(error, "cancel-analysis");
  }
}
