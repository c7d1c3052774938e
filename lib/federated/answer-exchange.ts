import "server-only";
import { z } from "zod";
import { findFederatedAnalysisById, updateFederatedClient } from "@/db/queries/federated-analyses";
import { answerExchange as storeAnswer, findExchange } from "@/db/queries/federated-digests";
import {
  AnalysisInputError,
  evaluationRequestSchema,
  evaluationSumsSchema,
  parseDigest,
} from "@/lib/analysis";
import type { ClientCaller } from "@/lib/auth/client-key-guard";
import { RuleError } from "@/lib/errors";
import { recordRefusal } from "./federated-rules";

type Sender = Pick<ClientCaller, "analysisId" | "client">;

const gramSchema = z.array(z.array(z.number().finite()));

/**
 * A client's answer to one question of the coordinator's fit: an evaluation's Σℓᵢ and Σ∇ℓᵢ (and
 * Σ∇²ℓᵢ when asked), or Σx̃x̃ᵀ for a least-squares fit; round 2's answer is the gradient digest
 * (acceptGradientDigest). Checked for finite numbers and the request's shape, then stored once.
 */
export async function answerExchange(
  sender: Sender,
  exchangeId: string,
  body: unknown,
): Promise<{ repeated: boolean }> {
  const exchange = await findExchange(exchangeId);
  if (!exchange || exchange.clientId !== sender.client.id) {
    throw new RuleError(404, "The coordinator asked this client no such question.");
  }
  if (exchange.answeredAt !== null) return { repeated: true };
  const name = sender.client.name;
  await recordRefusal(sender.client.id, async () => {
    if (exchange.kind === "gradients") {
      throw new RuleError(
        422,
        `client "${name}": round 2 is answered by sending the gradient digest`,
      );
    }
    const analysis = await findFederatedAnalysisById(sender.analysisId);
    const width = (analysis?.encoding?.columns.length ?? 0) + 1;
    if (exchange.kind === "gram") {
      const gram = parseDigest(body, gramSchema, "Σx̃x̃ᵀ answer");
      if (gram.length !== width || gram.some((row) => row.length !== width)) {
        throw new AnalysisInputError(`client "${name}": Σx̃x̃ᵀ has the wrong shape`, {
          expected: `${width} rows of ${width} numbers`,
        });
      }
    } else {
      const sums = parseDigest(body, evaluationSumsSchema, "evaluation answer");
      const request = evaluationRequestSchema.parse(exchange.request);
      const size = request.weights.length;
      const hessianSize = request.hessian ? size * size : 0;
      if (sums.gradientSum.length !== size || (sums.hessianSum?.length ?? 0) !== hessianSize) {
        throw new AnalysisInputError(
          `client "${name}": the evaluation's sums have the wrong shape`,
          {
            expected: `a gradient of ${size} numbers${request.hessian ? ` and a Hessian of ${hessianSize}` : ""}`,
          },
        );
      }
    }
  });
  const stored = await storeAnswer(sender.client.id, exchange.id, body);
  if (exchange.kind === "evaluate") {
    await updateFederatedClient(sender.client.id, { roundReached: "fit", lastRefusal: null });
  }
  return { repeated: !stored };
}
