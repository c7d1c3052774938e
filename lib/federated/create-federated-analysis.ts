import "server-only";
import { insertFederatedAnalysis, workspaceReportExists } from "@/db/queries/federated-analyses";
import { RuleError } from "@/lib/errors";
import { createFederatedAnalysisSchema } from "@/lib/validation/federated-analysis";

/**
 * Creates a federated analysis with its roster of expected clients; it waits for their schema
 * digests (round 1). The caller has checked the `runAnalysis` capability. Invalid input is a zod
 * error (422 with field errors).
 */
export async function createFederatedAnalysis(
  workspaceId: string,
  userId: string,
  input: unknown,
): Promise<{ analysisId: string }> {
  const options = createFederatedAnalysisSchema.parse(input);
  if (
    options.previousReportId !== undefined &&
    !(await workspaceReportExists(workspaceId, options.previousReportId))
  ) {
    throw new RuleError(422, "That report is not in this workspace.", "previousReportId");
  }
  const row = await insertFederatedAnalysis(
    {
      workspaceId,
      title: options.title,
      labelColumn: options.labelColumn,
      features: options.features ?? null,
      task: options.task ?? null,
      lambda: options.lambda,
      reference: options.reference,
      plan: {
        participants: options.participants,
        localSteps: options.localSteps,
        rounds: options.rounds,
        batchSize: options.batchSize,
      },
      minimumShardRows: options.minimumShardRows,
      previousReportId: options.previousReportId ?? null,
      createdBy: userId,
    },
    options.clients,
  );
  return { analysisId: row.id };
}
