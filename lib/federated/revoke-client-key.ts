import "server-only";
import { recordAudit, type AuditActor } from "@/db/queries/audit";
import { revokeClientKey as revokeStoredKey } from "@/db/queries/federated-client-keys";
import { RuleError } from "@/lib/errors";
import { requireFederatedAnalysis } from "./federated-rules";

/**
 * Revokes a live client key of this analysis at once, written to the audit log; 404 when there is
 * no such live key.
 */
export async function revokeClientKey(
  workspaceId: string,
  actor: AuditActor,
  analysisId: string,
  keyId: string,
): Promise<{ client: string }> {
  const analysis = await requireFederatedAnalysis(workspaceId, analysisId);
  const revoked = await revokeStoredKey(workspaceId, analysisId, keyId);
  if (!revoked) throw new RuleError(404, "There is no such live client key for this analysis.");
  await recordAudit({
    workspaceId,
    actor,
    action: "client-key.revoked",
    targetType: "client-key",
    targetId: keyId,
    details: { analysis: analysis.title, client: revoked.client },
  });
  return revoked;
}
