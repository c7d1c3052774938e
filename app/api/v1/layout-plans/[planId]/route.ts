import { findLayoutPlanProgress } from "@/db/queries/layout-plans";
import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { layoutPlanPathSchema } from "@/lib/api/schemas";
import { requireToken } from "@/lib/auth/api-token-guard";
import { RuleError } from "@/lib/errors";
import { toPlanStatusJson } from "@/lib/layout-plans/plan-status";

type Context = { params: Promise<{ planId: string }> };

/** A layout plan's state: the shared stage and every candidate's state and progress. */
export async function GET(request: Request, { params }: Context): Promise<Response> {
  return answerApiRequest("layout-plan-status", async () => {
    const { workspace } = await requireToken(request, "readWorkspace");
    const { planId } = layoutPlanPathSchema.parse(await params);
    const plan = await findLayoutPlanProgress(workspace.id, planId);
    if (!plan) throw new RuleError(404, "There is no such layout plan in this workspace.");
    return respondWithJson(toPlanStatusJson(plan));
  });
}
