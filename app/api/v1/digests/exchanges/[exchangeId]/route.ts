import { exchangePathSchema } from "@/lib/api/federated-schemas";
import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { requireClientKey } from "@/lib/auth/client-key-guard";
import { answerExchange } from "@/lib/federated";
import { readJsonBody } from "@/lib/uploads/read-json-body";

type Context = { params: Promise<{ exchangeId: string }> };

/** The client's answer to one evaluation of the fit (or Σx̃x̃ᵀ of a least-squares fit). */
export async function POST(request: Request, { params }: Context): Promise<Response> {
  return answerApiRequest("digest-answer", async () => {
    const caller = await requireClientKey(request);
    const { exchangeId } = exchangePathSchema.parse(await params);
    return respondWithJson(await answerExchange(caller, exchangeId, await readJsonBody(request)));
  });
}
