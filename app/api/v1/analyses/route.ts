import { listAnalysisPage } from "@/db/queries/analyses";
import { readListPage } from "@/lib/api/list-page";
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

/** The workspace's analyses, newest first, a page at a time (cursor paging). */
export async function GET(request: Request): Promise<Response> {
  return answerApiRequest("list-analyses", async () => {
    const { workspace } = await requireToken(request, "readWorkspace");
    const { limit, after } = readListPage(request);
    const { analyses, nextCursor } = await listAnalysisPage(workspace.id, limit, after);
    return respondWithJson({
      analyses: analyses.map((analysis) => ({
        ...analysis,
        createdAt: analysis.createdAt.toISOString(),
        finishedAt: analysis.finishedAt?.toISOString() ?? null,
      })),
      nextCursor,
    });
  });
}
