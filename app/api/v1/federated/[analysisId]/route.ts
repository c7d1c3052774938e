import { federatedPathSchema } from "@/lib/api/federated-schemas";
import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { requireToken } from "@/lib/auth/api-token-guard";
import { getFederatedStatus } from "@/lib/federated";

type Context = { params: Promise<{ analysisId: string }> };

/** A federated analysis's state, roster (what each client sent, when last seen) and keys. */
export async function GET(request: Request, { params }: Context): Promise<Response> {
  return answerApiRequest("federated-status", async () => {
    const { workspace } = await requireToken(request, "readWorkspace");
    const { analysisId } = federatedPathSchema.parse(await params);
    return respondWithJson(await getFederatedStatus(workspace.id, analysisId));
  });
}
