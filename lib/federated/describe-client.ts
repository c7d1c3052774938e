import "server-only";
import { findFederatedAnalysisById } from "@/db/queries/federated-analyses";
import type { ClientCaller } from "@/lib/auth/client-key-guard";
import { RuleError } from "@/lib/errors";

/**
 * What a client key's holder needs before round 1: its name on the roster and the analysis's
 * label, features and task, so the client reads its rows as every other client does.
 */
export async function describeClient(sender: Pick<ClientCaller, "analysisId" | "client">) {
  const analysis = await findFederatedAnalysisById(sender.analysisId);
  if (!analysis) throw new RuleError(404, "There is no such federated analysis.");
  return {
    client: sender.client.name,
    analysisId: analysis.id,
    title: analysis.title,
    state: analysis.state,
    labelColumn: analysis.labelColumn,
    features: analysis.features,
    task: analysis.task,
    minimumShardRows: analysis.minimumShardRows,
  };
}
