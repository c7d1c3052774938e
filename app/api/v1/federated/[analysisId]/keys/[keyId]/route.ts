import { clientKeyPathSchema } from "@/lib/api/federated-schemas";
import { answerApiRequest } from "@/lib/api/respond";
import { requireToken } from "@/lib/auth/api-token-guard";
import { revokeClientKey } from "@/lib/federated";

type Context = { params: Promise<{ analysisId: string; keyId: string }> };

/** Revokes a client key at once. */
export async function DELETE(request: Request, { params }: Context): Promise<Response> {
  return answerApiRequest("revoke-client-key", async () => {
    const { user, workspace } = await requireToken(request, "runAnalysis");
    const { analysisId, keyId } = clientKeyPathSchema.parse(await params);
    await revokeClientKey(workspace.id, user, analysisId, keyId);
    return new Response(null, { status: 204, headers: { "Cache-Control": "no-store" } });
  });
}
