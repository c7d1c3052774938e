import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { requireToken } from "@/lib/auth/api-token-guard";
import { createFederatedAnalysis, listFederatedAnalysesOf } from "@/lib/federated";
import { readJsonBody } from "@/lib/uploads/read-json-body";

/** Creates a federated analysis with its roster of expected clients; issue their keys next. */
export async function POST(request: Request): Promise<Response> {
  return answerApiRequest("create-federated", async () => {
    const { user, workspace } = await requireToken(request, "runAnalysis");
    const { analysisId } = await createFederatedAnalysis(
      workspace.id,
      user.id,
      await readJsonBody(request),
    );
    return respondWithJson({ analysisId, statusUrl: `/api/v1/federated/${analysisId}` }, 201);
  });
}

/** The workspace's federated analyses, newest first. */
export async function GET(request: Request): Promise<Response> {
  return answerApiRequest("list-federated", async () => {
    const { workspace } = await requireToken(request, "readWorkspace");
    return respondWithJson({ analyses: await listFederatedAnalysesOf(workspace.id) });
  });
}
