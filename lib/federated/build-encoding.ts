import "server-only";
import {
  findFederatedAnalysisById,
  listFederatedClients,
  moveFederatedState,
  storeFederatedEncoding,
} from "@/db/queries/federated-analyses";
import { listFederatedDigests } from "@/db/queries/federated-digests";
import { AnalysisInputError, mergeSchemaDigests, type SchemaDigest } from "@/lib/analysis";
import { enqueueFederatedAnalysis } from "@/lib/jobs";
import { orderRoster } from "./federated-rules";

/**
 * Merges round 1 into the encoding once every expected client has sent its schema digest, or the
 * roster is closed and at least one has: the clients that sent, in code-point order of their names
 * (the coordinator merges them in the same order, so it arrives at the same hash). Then the
 * coordinator's job is queued. A merge the engine refuses (e.g. a regression asked of a label
 * that is not numeric) fails the analysis with the engine's message. An encoding stored without
 * its job (the queueing failed) is queued on the next call. Returns the state after.
 */
export async function buildEncodingWhenReady(analysisId: string): Promise<string> {
  const analysis = await findFederatedAnalysisById(analysisId);
  if (!analysis) throw new Error(`federated analysis ${analysisId} is gone`);
  if (analysis.state === "encoding-ready" && analysis.jobId === null) {
    return queueCoordinator(analysisId);
  }
  if (analysis.state !== "collecting-schemas") return analysis.state;
  const roster = orderRoster(await listFederatedClients(analysisId));
  const digests = await listFederatedDigests(analysisId, "schema");
  const sent = roster.filter((client) => digests.has(client.id));
  const everyone = sent.length === roster.length;
  if (!everyone && (analysis.rosterClosedAt === null || sent.length === 0)) return analysis.state;
  try {
    const encoding = mergeSchemaDigests(
      sent.map((client) => digests.get(client.id) as SchemaDigest),
      { task: analysis.task ?? undefined, minimumShardRows: analysis.minimumShardRows },
    );
    if (!(await storeFederatedEncoding(analysisId, encoding))) {
      return (await findFederatedAnalysisById(analysisId))?.state ?? "failed";
    }
  } catch (error) {
    if (!(error instanceof AnalysisInputError)) throw error;
    await moveFederatedState(analysisId, ["collecting-schemas"], {
      state: "failed",
      failureMessage: error.message,
      finishedAt: new Date(),
    });
    return "failed";
  }
  return queueCoordinator(analysisId);
}

/** Queues the coordinator's job; one already queued for the analysis (its singleton key) serves. */
async function queueCoordinator(analysisId: string): Promise<string> {
  const jobId = await enqueueFederatedAnalysis({ federatedAnalysisId: analysisId });
  if (jobId !== null) await moveFederatedState(analysisId, ["encoding-ready"], { jobId });
  return "encoding-ready";
}
