import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { requireToken } from "@/lib/auth/api-token-guard";
import { queueAnalysis } from "@/lib/reports/queue-analysis";
import { readJsonBody } from "@/lib/uploads/read-json-body";
import { startAnalysisSchema } from "@/lib/validation/start-analysis";

/** Queues an analysis of registered files with the plan's parameters; poll its statusUrl. */
export async function POST(request: Request): Promise<Response> {
  return answerApiRequest("start-analysis", async () => {
    const { user, workspace } = await requireToken(request, "runAnalysis");
    const input = startAnalysisSchema.parse(await readJsonBody(request));
    const { analysisId } = await queueAnalysis(workspace.id, user.id, input);
    return respondWithJson({ analysisId, statusUrl: `/api/v1/analyses/${analysisId}` }, 202);
  });
}
