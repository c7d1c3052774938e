import "server-only";
import { recordAudit, type AuditActor } from "@/db/queries/audit";
import { moveFederatedState } from "@/db/queries/federated-analyses";
import { COORDINATED_FEDERATED_STATES, ENDED_FEDERATED_STATES } from "@/db/schema/federated";
import { RuleError } from "@/lib/errors";
import { requireFederatedAnalysis } from "./federated-rules";

/** Shown as the analysis's failure when the analyst stopped it. */
export const CANCELLED_MESSAGE = "The analyst stopped this analysis.";

/**
 * Stops a federated analysis that has not ended: it fails with CANCELLED_MESSAGE, its
 * coordinator lets go of it within a second, and its clients hear that it ended. Their accepted
 * digests stay stored. Written to the audit log.
 */
export async function cancelFederatedAnalysis(
  workspaceId: string,
  actor: AuditActor,
  analysisId: string,
): Promise<void> {
  const analysis = await requireFederatedAnalysis(workspaceId, analysisId);
  const moved =
    !ENDED_FEDERATED_STATES.includes(analysis.state) &&
    (await moveFederatedState(analysisId, ["collecting-schemas", ...COORDINATED_FEDERATED_STATES], {
      state: "failed",
      failureMessage: CANCELLED_MESSAGE,
      finishedAt: new Date(),
    }));
  if (!moved) throw new RuleError(409, "This analysis has already ended.");
  await recordAudit({
    workspaceId,
    actor,
    action: "federated.cancelled",
    targetType: "federated-analysis",
    targetId: analysisId,
    details: { analysis: analysis.title },
  });
}
