import "server-only";
import { findFederatedClientByName } from "@/db/queries/federated-analyses";
import { RuleError } from "@/lib/errors";
import { requireFederatedAnalysis } from "./federated-rules";

/**
 * The analyst uploading a client's digest file acts as that client: the sender that
 * acceptSchemaDigest and acceptGradientDigest take, for a client on this workspace's analysis's
 * roster (404 for another workspace's analysis, 422 naming the client when it is not on the roster).
 */
export async function findRosterSender(
  workspaceId: string,
  analysisId: string,
  clientName: string,
): Promise<{ analysisId: string; client: { id: string; name: string } }> {
  await requireFederatedAnalysis(workspaceId, analysisId);
  const client = await findFederatedClientByName(analysisId, clientName);
  if (!client) {
    throw new RuleError(422, `“${clientName}” is not on this analysis's roster.`, "client");
  }
  return { analysisId, client: { id: client.id, name: client.name } };
}
