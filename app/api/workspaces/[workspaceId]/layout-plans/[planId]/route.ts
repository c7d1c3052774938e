import { findLayoutPlanProgress } from "@/db/queries/layout-plans";
import { AccessError } from "@/lib/auth/errors";
import { requireRole } from "@/lib/auth/guards";
import { respondWithError } from "@/lib/http/handler-errors";
import { toPlanStatusJson } from "@/lib/layout-plans/plan-status";

type RouteContext = { params: Promise<{ workspaceId: string; planId: string }> };

/** A plan's live state for its progress page, polled every second while it runs. */
export async function GET(_request: Request, context: RouteContext): Promise<Response> {
  try {
    const { workspaceId, planId } = await context.params;
    const { workspace } = await requireRole(workspaceId, "readWorkspace");
    const plan = await findLayoutPlanProgress(workspace.id, planId);
    if (!plan) throw new AccessError(404, "That layout plan does not exist in this workspace.");
    return Response.json(toPlanStatusJson(plan), { headers: { "Cache-Control": "no-store" } });
  } catch (error) {
    return respondWithError(error, "layout plan status");
  }
}
