import { federatedPathSchema } from "@/lib/api/federated-schemas";
import { answerApiRequest } from "@/lib/api/respond";
import { requireToken } from "@/lib/auth/api-token-guard";
import { cancelFederatedAnalysis } from "@/lib/federated";

type Context = { params: Promise<{ analysisId: string }> };

/** Stops a federated analysis that has not ended; accepted digests stay stored. */
export async function POST(request: Request, { params }: Context): Promise<Response> {
  return answerApiRequest("cancel-federated", async () => {
    const { user, workspace } = await requireToken(request, "runAnalysis");
    const { analysisId } = federatedPathSchema.parse(await params);
    await cancelFederatedAnalysis(workspace.id, user, analysisId);
    return new Response(null, { status: 204, headers: { "Cache-Control": "no-store" } });
  });
}
