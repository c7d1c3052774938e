import { findAnalysisStatus } from "@/db/queries/analyses";
import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { analysisPathSchema } from "@/lib/api/schemas";
import { requireToken } from "@/lib/auth/api-token-guard";
import { RuleError } from "@/lib/errors";
import { overallProgress, toStatusJson } from "@/lib/reports/analysis-status";

type Context = { params: Promise<{ analysisId: string }> };

/** An analysis's status, stage and progress; `reportId` once it succeeded. */
export async function GET(request: Request, { params }: Context): Promise<Response> {
  return answerApiRequest("analysis-status", async () => {
    const { workspace } = await requireToken(request, "readWorkspace");
    const { analysisId } = analysisPathSchema.parse(await params);
    const view = await findAnalysisStatus(workspace.id, analysisId);
    if (!view) throw new RuleError(404, "There is no such analysis in this workspace.");
    const status = toStatusJson(view);
    return respondWithJson({ ...status, progress: overallProgress(status) });
  });
}
