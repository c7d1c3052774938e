import "server-only";
import { revokeClientKey as revokeStoredKey } from "@/db/queries/federated-client-keys";
import { RuleError } from "@/lib/errors";

/** Revokes a live client key of this analysis at once; 404 when there is no such live key. */
export async function revokeClientKey(
  workspaceId: string,
  analysisId: string,
  keyId: string,
): Promise<{ client: string }> {
  const revoked = await revokeStoredKey(workspaceId, analysisId, keyId);
  if (!revoked) throw new RuleError(404, "There is no such live client key for this analysis.");
  return revoked;
}
