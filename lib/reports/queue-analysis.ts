import "server-only";
import {
  deleteUnqueuedAnalysis,
  findInputFiles,
  insertAnalysis,
  reportExists,
  setAnalysisJobId,
  type AnalysisInputFile,
} from "@/db/queries/analyses";
import { findDataFile } from "@/db/queries/data-files";
import { RuleError } from "@/lib/errors";
import { enqueueAnalysis } from "@/lib/jobs";
import { checkParticipants } from "@/lib/reports/check-participants";
import { estimateRequestedSimulation } from "@/lib/reports/estimate-requested-simulation";
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
 * Queues an analysis of registered files, for the analysis form and the API alike, and returns
 * its id. The caller has checked that `userId` may run analyses in this workspace.
 */
export async function queueAnalysis(
  workspaceId: string,
  userId: string,
  input: StartAnalysisInput,
): Promise<{ analysisId: string }> {
  const request = startAnalysisSchema.parse(input);
  const files = await resolveInputFiles(workspaceId, request);
  if (request.previousReportId && !(await reportExists(workspaceId, request.previousReportId))) {
    throw new RuleError(422, "The report to revise is not in this workspace.", "previousReportId");
  }
  const { participants, shardColumn } = request.options;
  if (participants !== undefined) {
    const shardFile = files.layout ?? files.dataset;
    const preview = (await findDataFile(workspaceId, shardFile.id))?.preview ?? null;
    await checkParticipants(participants, {
      fileName: shardFile.name,
      objectKey: shardFile.objectKey,
      sizeBytes: shardFile.sizeBytes,
      preview,
      column: files.layout ? "shard" : (shardColumn ?? "shard"),
    });
  }
  // A simulation above the budget as the previews show it is refused here, on its own field, with
  // the engine's message; the engine checks the exact cost again once it has read the dataset.
  const simulation = await estimateRequestedSimulation(workspaceId, request);
  if (simulation?.refusal) throw new RuleError(422, simulation.refusal, "options.simulate");
  const partitionName = files.layout?.name ?? request.options.shardColumn;
  const title = request.title || `${files.dataset.name} · ${partitionName}`;
  const analysisId = await insertAnalysis(workspaceId, userId, { ...request, title });
  try {
    const jobId = await enqueueAnalysis({ analysisId, workspaceId });
    await setAnalysisJobId(workspaceId, analysisId, jobId);
  } catch (error) {
    await deleteUnqueuedAnalysis(workspaceId, analysisId);
    throw error;
  }
  return { analysisId };
}
