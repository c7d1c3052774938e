import { waitQuerySchema } from "@/lib/api/federated-schemas";
import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { requireClientKey } from "@/lib/auth/client-key-guard";
import { waitForClientWork } from "@/lib/federated";

/** Long poll: the coordinator's next question to this client, or the analysis's end. */
export async function GET(request: Request): Promise<Response> {
  return answerApiRequest("digest-work", async () => {
    const caller = await requireClientKey(request);
    const { wait } = waitQuerySchema.parse(Object.fromEntries(new URL(request.url).searchParams));
    const work = await waitForClientWork(caller, { waitMs: wait * 1000, signal: request.signal });
    return respondWithJson(work);
  });
}
