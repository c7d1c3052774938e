import "server-only";
import {
  findFederatedAnalysis,
  updateFederatedClient,
  type FederatedAnalysisRow,
  type FederatedClientRow,
} from "@/db/queries/federated-analyses";
import { AnalysisInputError, compareCodePoints } from "@/lib/analysis";
import { RuleError } from "@/lib/errors";

/** The analysis of this workspace, or a 404 (another workspace's looks the same as none). */
export async function requireFederatedAnalysis(
  workspaceId: string,
  analysisId: string,
): Promise<FederatedAnalysisRow> {
  const analysis = await findFederatedAnalysis(workspaceId, analysisId);
  if (!analysis) throw new RuleError(404, "There is no such federated analysis in this workspace.");
  return analysis;
}

/** The roster in code-point order of the names: the order every merge takes the clients in. */
export function orderRoster<Client extends Pick<FederatedClientRow, "name">>(
  clients: Client[],
): Client[] {
  return [...clients].sort((a, b) => compareCodePoints(a.name, b.name));
}

/** An engine input error as the refusal the API answers (422), its message unchanged. */
function asRefusal(error: unknown): unknown {
  return error instanceof AnalysisInputError ? new RuleError(422, error.message) : error;
}

/**
 * Runs a client's check-and-store; a refusal (an engine input error becomes a 422) is recorded
 * on the roster as the client's last refusal, so the analyst sees why, and thrown on.
 */
export async function recordRefusal<T>(clientId: string, work: () => Promise<T>): Promise<T> {
  try {
    return await work();
  } catch (error) {
    const refusal = asRefusal(error);
    if (refusal instanceof RuleError) {
      await updateFederatedClient(clientId, { lastRefusal: refusal.message });
    }
    throw refusal;
  }
}
