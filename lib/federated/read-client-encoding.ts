import "server-only";
import { findFederatedAnalysisById } from "@/db/queries/federated-analyses";
import type { DigestEncoding } from "@/lib/analysis";
import type { ClientCaller } from "@/lib/auth/client-key-guard";
import { RuleError } from "@/lib/errors";

/**
 * The encoding (merged round 1) for a client: the pooled preprocessing it applies to its rows
 * before round 2. A 409 while round 1 is still open, so the client knows to ask again.
 */
export async function readClientEncoding(
  sender: Pick<ClientCaller, "analysisId">,
): Promise<DigestEncoding> {
  const analysis = await findFederatedAnalysisById(sender.analysisId);
  if (!analysis) throw new RuleError(404, "There is no such federated analysis.");
  if (analysis.encoding === null) {
    throw new RuleError(
      409,
      analysis.state === "failed"
        ? `The analysis failed: ${analysis.failureMessage ?? "no encoding was made"}`
        : "Round 1 is still open: the encoding is made once every expected client has sent its schema digest or the analyst closes the roster.",
    );
  }
  return analysis.encoding;
}
