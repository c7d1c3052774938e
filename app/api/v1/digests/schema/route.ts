import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { requireClientKey } from "@/lib/auth/client-key-guard";
import { acceptSchemaDigest } from "@/lib/federated";
import { readJsonBody } from "@/lib/uploads/read-json-body";

/** Round 1: the client's schema digest. */
export async function POST(request: Request): Promise<Response> {
  return answerApiRequest("schema-digest", async () => {
    const caller = await requireClientKey(request);
    const { repeated } = await acceptSchemaDigest(caller, await readJsonBody(request));
    return respondWithJson({ repeated }, repeated ? 200 : 201);
  });
}
