import { federatedPathSchema } from "@/lib/api/federated-schemas";
import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { requireToken } from "@/lib/auth/api-token-guard";
import { closeRoster } from "@/lib/federated";

type Context = { params: Promise<{ analysisId: string }> };

/** Ends round 1 without the clients still missing; the report will list them. */
export async function POST(request: Request, { params }: Context): Promise<Response> {
  return answerApiRequest("close-roster", async () => {
    const { user, workspace } = await requireToken(request, "runAnalysis");
    const { analysisId } = federatedPathSchema.parse(await params);
    return respondWithJson(await closeRoster(workspace.id, user, analysisId));
  });
}
