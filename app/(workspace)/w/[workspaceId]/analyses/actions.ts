"use server";

import { cancelQueuedOrRunning } from "@/db/queries/analyses";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { requireRole } from "@/lib/auth/guards";
import { estimateRequestedSimulation } from "@/lib/reports/estimate-requested-simulation";
import { queueAnalysis } from "@/lib/reports/queue-analysis";
import type { SimulationCostView } from "@/lib/reports/simulation-estimate";
import { simulationEstimateSchema, type StartAnalysisInput } from "@/lib/validation/start-analysis";

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

/**
 * The simulation's estimated cost for the form's choices so far, worded, with the refusal the
 * server would give (methods.md §7); null while the choices do not tell enough. Changes nothing.
 */
export async function estimateSimulation(
  workspaceId: string,
  input: StartAnalysisInput,
): Promise<ActionResult<SimulationCostView | null>> {
  try {
    await requireRole(workspaceId, "runAnalysis");
    const request = simulationEstimateSchema.safeParse(input);
    return succeed(
      request.success ? await estimateRequestedSimulation(workspaceId, request.data) : null,
    );
  } catch (error) {
    return failWith(error, "estimate-simulation");
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
