import "server-only";
import { findInputFiles } from "@/db/queries/analyses";
import {
  deleteUnqueuedLayoutPlan,
  insertLayoutPlan,
  setLayoutPlanJobId,
} from "@/db/queries/layout-plans";
import { RuleError } from "@/lib/errors";
import { enqueueLayoutPlan } from "@/lib/jobs";
import { layoutPlanSchema, type LayoutPlanInput } from "@/lib/validation/layout-plan";

/**
 * Queues a layout plan of a registered dataset, for the web form and the API alike, and returns
 * its id. The caller has checked that `userId` may run analyses in this workspace.
 */
export async function queueLayoutPlan(
  workspaceId: string,
  userId: string,
  input: LayoutPlanInput,
): Promise<{ planId: string }> {
  const request = layoutPlanSchema.parse(input);
  const [dataset] = await findInputFiles(workspaceId, [request.datasetFileId]);
  if (!dataset) {
    throw new RuleError(
      422,
      "That file is not in this workspace; upload it again.",
      "datasetFileId",
    );
  }
  if (dataset.kind !== "dataset") {
    throw new RuleError(422, `“${dataset.name}” was not uploaded as a dataset.`, "datasetFileId");
  }
  const planId = await insertLayoutPlan(workspaceId, userId, request);
  try {
    const jobId = await enqueueLayoutPlan({ planId, workspaceId });
    await setLayoutPlanJobId(workspaceId, planId, jobId);
  } catch (error) {
    await deleteUnqueuedLayoutPlan(workspaceId, planId);
    throw error;
  }
  return { planId };
}
