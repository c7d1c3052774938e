import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { requireClientKey } from "@/lib/auth/client-key-guard";
import { readClientEncoding } from "@/lib/federated";

/** The encoding (merged round 1); 409 while round 1 is open. */
export async function GET(request: Request): Promise<Response> {
  return answerApiRequest("digest-encoding", async () =>
    respondWithJson(await readClientEncoding(await requireClientKey(request))),
  );
}
