import "server-only";
import { findFederatedAnalysisById, updateFederatedClient } from "@/db/queries/federated-analyses";
import {
  findFederatedDigest,
  insertFederatedDigest,
  listFederatedDigests,
} from "@/db/queries/federated-digests";
import {
  AnalysisInputError,
  checkSchemaAgreement,
  hashDocument,
  parseDigest,
  schemaDigestSchema,
  type SchemaDigest,
} from "@/lib/analysis";
import type { ClientCaller } from "@/lib/auth/client-key-guard";
import { RuleError } from "@/lib/errors";
import { buildEncodingWhenReady } from "./build-encoding";
import { recordRefusal } from "./federated-rules";

type Sender = Pick<ClientCaller, "analysisId" | "client">;

/**
 * Round 1 from one client (its key, or the analyst uploading its file): the schema digest is
 * checked on arrival — its form (finite numbers), that it names this client, the analysis's label
 * and features, and with the digests already accepted no shard twice and none under the minimum
 * rows — and stored; a refusal names the client and shard and leaves every accepted digest as it
 * was. Sending the same digest again is harmless (a client that rejoins). When the last expected
 * client has sent, the encoding is built.
 */
export async function acceptSchemaDigest(
  sender: Sender,
  document: unknown,
): Promise<{ state: string; repeated: boolean }> {
  const analysis = await findFederatedAnalysisById(sender.analysisId);
  if (!analysis) throw new RuleError(404, "There is no such federated analysis.");
  const sha256 = hashDocument(document);
  const stored = await findFederatedDigest(sender.client.id, "schema");
  if (stored?.sha256 === sha256) {
    // A client resending after a failed reply: finish what that reply may have left undone.
    return { state: await buildEncodingWhenReady(analysis.id), repeated: true };
  }
  const name = sender.client.name;
  await recordRefusal(sender.client.id, async () => {
    if (stored) {
      throw new RuleError(
        409,
        `client "${name}" already sent a different schema digest; round 1 keeps the first`,
      );
    }
    if (analysis.state !== "collecting-schemas") {
      throw new RuleError(
        409,
        `client "${name}": round 1 is over (the roster was closed without it)`,
      );
    }
    const digest = parseDigest(document, schemaDigestSchema, "schema digest");
    checkBelongs(digest, name, analysis);
    const others = await listFederatedDigests(analysis.id, "schema");
    checkSchemaAgreement(
      [...[...others.values()].map((other) => other as SchemaDigest), digest],
      analysis.minimumShardRows,
    );
    await insertFederatedDigest({
      clientId: sender.client.id,
      round: "schema",
      document,
      sha256,
    });
    await updateFederatedClient(sender.client.id, {
      shards: digest.shards.map((shard) => shard.id),
      rows: digest.shards.reduce((total, shard) => total + shard.rows, 0),
      roundReached: "schema",
      lastRefusal: null,
    });
  });
  const state = await buildEncodingWhenReady(analysis.id);
  return { state, repeated: false };
}

/** The digest is this client's, for this analysis's label and features. */
function checkBelongs(
  digest: SchemaDigest,
  client: string,
  analysis: { labelColumn: string; features: string[] | null },
): void {
  if (digest.client !== client) {
    throw new AnalysisInputError(
      `the schema digest is client "${digest.client}"'s, sent with client "${client}"'s key`,
      { expected: `a digest made with --client "${client}" (or by the online command)` },
    );
  }
  if (digest.labelColumn !== analysis.labelColumn) {
    throw new AnalysisInputError(
      `client "${client}" used the label column "${digest.labelColumn}"`,
      { column: digest.labelColumn, expected: `the label column "${analysis.labelColumn}"` },
    );
  }
  const named = analysis.features;
  if (named !== null) {
    const same =
      digest.features.length === named.length &&
      named.every((feature) => digest.features.includes(feature));
    if (!same) {
      throw new AnalysisInputError(`client "${client}" sent other feature columns`, {
        expected: `the feature columns ${named.join(", ")}`,
      });
    }
  }
}
