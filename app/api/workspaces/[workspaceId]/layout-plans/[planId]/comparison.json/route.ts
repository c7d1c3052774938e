import { findLayoutPlan } from "@/db/queries/layout-plans";
import { AccessError } from "@/lib/auth/errors";
import { requireRole } from "@/lib/auth/guards";
import { respondWithError } from "@/lib/http/handler-errors";
import { buildComparisonJson } from "@/lib/layout-plans/comparison-view";
import { describeDownload } from "@/lib/reports/export-file-name";

type RouteContext = { params: Promise<{ workspaceId: string; planId: string }> };

/** The comparison with methods.md §8's keys, as `npm run layouts` writes layouts.json. */
export async function GET(_request: Request, context: RouteContext): Promise<Response> {
  try {
    const { workspaceId, planId } = await context.params;
    const { workspace } = await requireRole(workspaceId, "readWorkspace");
    const plan = await findLayoutPlan(workspace.id, planId);
    if (!plan) throw new AccessError(404, "That layout plan does not exist in this workspace.");
    return new Response(`${JSON.stringify(buildComparisonJson(plan), null, 2)}\n`, {
      // The CLI's file name, so a pipeline reads either the same way.
      headers: describeDownload("layouts.json", "application/json; charset=utf-8"),
    });
  } catch (error) {
    return respondWithError(error, "layout comparison export");
  }
}
