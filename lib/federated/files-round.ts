import "server-only";
import type { FederatedAnalysisRow } from "@/db/queries/federated-analyses";
import { listFederatedClients, moveFederatedState } from "@/db/queries/federated-analyses";
import { listFederatedDigests } from "@/db/queries/federated-digests";
import type { FederatedState } from "@/db/schema/federated";
import {
  createMeasurementRequest,
  gradientDigestSchema,
  hashDocument,
  type GradientDigest,
  type MeasurementRequest,
} from "@/lib/analysis";
import { enqueueFederatedAnalysis } from "@/lib/jobs";

/**
 * Round 2 as files (methods.md §9): for a reference that needs no fit (zero or supplied weights),
 * clients that cannot stay connected measure at that point with `npm run digest -- gradients --at`
 * and send the file; the supplied point stands in for W* (distance B and the path t·W). This is
 * that measurement's request — the one such a file quotes — or null for the pooled optimum, which
 * needs every client online for its fit.
 */
export function filesRequestOf(
  analysis: Pick<FederatedAnalysisRow, "reference" | "encoding">,
): { request: MeasurementRequest; key: string } | null {
  if (analysis.reference === "optimum" || analysis.encoding === null) return null;
  const request = createMeasurementRequest(analysis.encoding, analysis.reference, null);
  return { request, key: hashDocument(request) };
}

/**
 * The participants' (clients that sent round 1) gradient digests measured at the files request,
 * in the order given; `missing` lists the participants without one yet.
 */
export async function collectFileDigests<Client extends { id: string; name: string }>(
  analysisId: string,
  participants: Client[],
  filesKey: string,
): Promise<{ digests: GradientDigest[]; missing: Client[] }> {
  const stored = await listFederatedDigests(analysisId, "gradients");
  const digests: GradientDigest[] = [];
  const missing: Client[] = [];
  for (const client of participants) {
    const document = stored.get(client.id);
    const digest = document === undefined ? null : gradientDigestSchema.parse(document);
    if (digest !== null && hashDocument(digest.request) === filesKey) digests.push(digest);
    else missing.push(client);
  }
  return { digests, missing };
}

/** The coordinator's states before it merges: a files round's merge can still be queued. */
const BEFORE_MERGING: readonly FederatedState[] = [
  "encoding-ready",
  "fitting",
  "collecting-gradients",
];

/**
 * Queues the coordinator once every participant's round-2 file is in, so it merges them (a
 * coordinator still running finishes first; the queue holds one more job per analysis). Safe to
 * repeat: a client resending its file after a lost reply queues what that reply may have missed.
 */
export async function queueMergeWhenFilesAreIn(analysis: FederatedAnalysisRow): Promise<void> {
  const files = filesRequestOf(analysis);
  if (files === null || !BEFORE_MERGING.includes(analysis.state)) {
    return;
  }
  const schemas = await listFederatedDigests(analysis.id, "schema");
  const participants = (await listFederatedClients(analysis.id)).filter((client) =>
    schemas.has(client.id),
  );
  const { missing } = await collectFileDigests(analysis.id, participants, files.key);
  if (missing.length > 0) return;
  const jobId = await enqueueFederatedAnalysis({ federatedAnalysisId: analysis.id });
  if (jobId !== null) {
    await moveFederatedState(analysis.id, BEFORE_MERGING, {
      jobId,
    });
  }
}
