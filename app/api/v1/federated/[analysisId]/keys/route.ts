import { federatedPathSchema } from "@/lib/api/federated-schemas";
import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { requireToken } from "@/lib/auth/api-token-guard";
import { issueClientKey } from "@/lib/federated";
import { readJsonBody } from "@/lib/uploads/read-json-body";

type Context = { params: Promise<{ analysisId: string }> };

/** Issues a client key for one roster client; the key is in this answer only. */
export async function POST(request: Request, { params }: Context): Promise<Response> {
  return answerApiRequest("issue-client-key", async () => {
    const { user, workspace } = await requireToken(request, "runAnalysis");
    const { analysisId } = federatedPathSchema.parse(await params);
    const issued = await issueClientKey(
      workspace.id,
      user,
      analysisId,
      await readJsonBody(request),
    );
    return respondWithJson(issued, 201);
  });
}
