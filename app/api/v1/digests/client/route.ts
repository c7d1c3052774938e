import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { requireClientKey } from "@/lib/auth/client-key-guard";
import { describeClient } from "@/lib/federated";

/** The key's client and its analysis's label, features and task (before round 1). */
export async function GET(request: Request): Promise<Response> {
  return answerApiRequest("digest-client", async () =>
    respondWithJson(await describeClient(await requireClientKey(request))),
  );
}
