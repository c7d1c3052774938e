import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { requireToken } from "@/lib/auth/api-token-guard";
import { queueLayoutPlan } from "@/lib/layout-plans/queue-layout-plan";
import { readJsonBody } from "@/lib/uploads/read-json-body";
import { layoutPlanSchema } from "@/lib/validation/layout-plan";

/** Queues a layout plan of a registered dataset; poll its statusUrl, then read its resultUrl. */
export async function POST(request: Request): Promise<Response> {
  return answerApiRequest("start-layout-plan", async () => {
    const { user, workspace } = await requireToken(request, "runAnalysis");
    const input = layoutPlanSchema.parse(await readJsonBody(request));
    const { planId } = await queueLayoutPlan(workspace.id, user.id, input);
    return respondWithJson(
      {
        planId,
        statusUrl: `/api/v1/layout-plans/${planId}`,
        resultUrl: `/api/v1/layout-plans/${planId}/result`,
      },
      202,
    );
  });
}
