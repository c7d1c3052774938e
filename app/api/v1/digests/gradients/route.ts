import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { requireClientKey } from "@/lib/auth/client-key-guard";
import { acceptGradientDigest } from "@/lib/federated";
import { readJsonBody } from "@/lib/uploads/read-json-body";

/** Round 2: the client's gradient digest at the points the coordinator asked for. */
export async function POST(request: Request): Promise<Response> {
  return answerApiRequest("gradient-digest", async () => {
    const caller = await requireClientKey(request);
    const { repeated } = await acceptGradientDigest(caller, await readJsonBody(request));
    return respondWithJson({ repeated }, repeated ? 200 : 201);
  });
}
