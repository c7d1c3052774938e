"use server";

import { cancelQueuedOrRunning } from "@/db/queries/analyses";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { requireRole } from "@/lib/auth/guards";
import { queueAnalysis } from "@/lib/reports/queue-analysis";
import type { StartAnalysisInput } from "@/lib/validation/start-analysis";

/**
 * Queues an analysis of registered files. Returns its id; the browser then follows its progress
 * at /w/[workspaceId]/analyses/[analysisId].
 */
export async function startAnalysis(
  workspaceId: string,
  input: StartAnalysisInput,
): Promise<ActionResult<{ analysisId: string }>> {
  try {
    const { user } = await requireRole(workspaceId, "runAnalysis");
    return succeed(await queueAnalysis(workspaceId, user.id, input));
  } catch (error) {
    return failWith(error, "start-analysis");
  }
}

/** Stops a queued or running analysis; its inputs stay, and nothing is stored for it. */
export async function cancelAnalysis(
  workspaceId: string,
  analysisId: string,
): Promise<ActionResult> {
  try {
    await requireRole(workspaceId, "runAnalysis");
    await cancelQueuedOrRunning(workspaceId, analysisId);
    return succeed();
  } catch (error) {
    return failWith(error, "cancel-analysis");
  }
}
