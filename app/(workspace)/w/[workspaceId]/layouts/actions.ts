"use server";

import { cancelLayoutPlan } from "@/db/queries/layout-plans";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { requireRole } from "@/lib/auth/guards";
import { RuleError } from "@/lib/errors";
import { queueLayoutPlan } from "@/lib/layout-plans/queue-layout-plan";
import { registerCandidateMap } from "@/lib/layout-plans/register-candidate-map";
import type { LayoutPlanInput } from "@/lib/validation/layout-plan";

/** Queues a layout plan; the browser then follows it at /w/[workspaceId]/layouts/[planId]. */
export async function startLayoutPlan(
  workspaceId: string,
  input: LayoutPlanInput,
): Promise<ActionResult<{ planId: string }>> {
  try {
    const { user } = await requireRole(workspaceId, "runAnalysis");
    return succeed(await queueLayoutPlan(workspaceId, user.id, input));
  } catch (error) {
    return failWith(error, "start-layout-plan");
  }
}

/** Stops a queued or running plan; the candidates already scored stay. */
export async function cancelPlan(workspaceId: string, planId: string): Promise<ActionResult> {
  try {
    await requireRole(workspaceId, "runAnalysis");
    await cancelLayoutPlan(workspaceId, planId);
    return succeed();
  } catch (error) {
    return failWith(error, "cancel-layout-plan");
  }
}

/**
 * Registers a scored candidate's map as a layout file of the workspace (as if uploaded) and
 * returns it, for the new-analysis form to open with everything filled in.
 */
export async function analyseCandidate(
  workspaceId: string,
  planId: string,
  ordinal: number,
): Promise<ActionResult<{ layoutFileId: string }>> {
  try {
    const { user } = await requireRole(workspaceId, "uploadData");
    const layoutFileId = await registerCandidateMap(workspaceId, planId, ordinal, user.id);
    if (!layoutFileId) throw new RuleError(404, "That layout is not in this workspace.");
    return succeed({ layoutFileId });
  } catch (error) {
    return failWith(error, "analyse-layout");
  }
}
