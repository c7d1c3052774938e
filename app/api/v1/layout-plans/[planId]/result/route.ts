import { findLayoutPlan } from "@/db/queries/layout-plans";
import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { layoutPlanPathSchema } from "@/lib/api/schemas";
import { requireToken } from "@/lib/auth/api-token-guard";
import { RuleError } from "@/lib/errors";
import { buildComparisonJson } from "@/lib/layout-plans/comparison-view";
import { isFinished } from "@/lib/reports/analysis-status";

type Context = { params: Promise<{ planId: string }> };

/** The comparison with methods.md §8's keys, once the plan has ended (409 before). */
export async function GET(request: Request, { params }: Context): Promise<Response> {
  return answerApiRequest("layout-plan-result", async () => {
    const { workspace } = await requireToken(request, "readWorkspace");
    const { planId } = layoutPlanPathSchema.parse(await params);
    const plan = await findLayoutPlan(workspace.id, planId);
    if (!plan) throw new RuleError(404, "There is no such layout plan in this workspace.");
    if (!isFinished(plan.status)) {
      throw new RuleError(409, "The plan is still running; poll its statusUrl until it ends.");
    }
    return respondWithJson(buildComparisonJson(plan));
  });
}
