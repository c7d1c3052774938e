import "server-only";
import {
  findFederatedAnalysisOfReport,
  listFederatedClients,
} from "@/db/queries/federated-analyses";
import type { FederatedPlanToRevise } from "@/lib/validation/federated-form";
import { orderRoster } from "./federated-rules";

/**
 * "Run again" on a report built from digests: the options, reference, plan and roster of the
 * federated analysis that made it (a report of this workspace), or undefined.
 */
export async function findPlanToRevise(
  workspaceId: string,
  reportId: string,
): Promise<FederatedPlanToRevise | undefined> {
  const analysis = await findFederatedAnalysisOfReport(workspaceId, reportId);
  if (!analysis) return undefined;
  const roster = orderRoster(await listFederatedClients(analysis.id));
  return {
    title: analysis.title,
    labelColumn: analysis.labelColumn,
    features: analysis.features,
    task: analysis.task,
    lambda: analysis.lambda,
    reference: analysis.reference,
    plan: analysis.plan,
    minimumShardRows: analysis.minimumShardRows,
    clients: roster.map((client) => client.name),
  };
}
