import "server-only";
import { findFederatedClientByName } from "@/db/queries/federated-analyses";
import { RuleError } from "@/lib/errors";
import { requireFederatedAnalysis } from "./federated-rules";

/**
 * A roster client as the sender of a digest the analyst uploads for it (a client without a
 * network path): the same sender a client key's request has. 404 outside this workspace.
 */
export async function findClientSender(
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
