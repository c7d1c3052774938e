import "server-only";
import { recordAudit, type AuditActor } from "@/db/queries/audit";
import { closeFederatedRoster, listFederatedClients } from "@/db/queries/federated-analyses";
import { RuleError } from "@/lib/errors";
import { buildEncodingWhenReady } from "./build-encoding";
import { requireFederatedAnalysis } from "./federated-rules";

/**
 * The analyst goes on without the clients still missing: round 1 ends with those that sent their
 * schema digest, the encoding is built from them, and the report will list the others as missing.
 * Written to the audit log.
 */
export async function closeRoster(
  workspaceId: string,
  actor: AuditActor,
  analysisId: string,
): Promise<{ state: string; missing: string[] }> {
  const analysis = await requireFederatedAnalysis(workspaceId, analysisId);
  if (analysis.state !== "collecting-schemas") {
    throw new RuleError(409, "Round 1 is already over; the roster cannot change any more.");
  }
  const roster = await listFederatedClients(analysisId);
  if (!roster.some((client) => client.roundReached !== "none")) {
    throw new RuleError(
      409,
      "No client has sent its schema digest yet, so there is nothing to go on with.",
    );
  }
  if (!(await closeFederatedRoster(workspaceId, analysisId))) {
    throw new RuleError(409, "Round 1 is already over; the roster cannot change any more.");
  }
  const missing = roster
    .filter((client) => client.roundReached === "none")
    .map((client) => client.name);
  await recordAudit({
    workspaceId,
    actor,
    action: "federated.roster-closed",
    targetType: "federated-analysis",
    targetId: analysisId,
    details: { analysis: analysis.title, missing },
  });
  const state = await buildEncodingWhenReady(analysisId);
  return { state, missing };
}
