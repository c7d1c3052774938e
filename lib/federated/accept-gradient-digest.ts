import "server-only";
import {
  findFederatedAnalysisById,
  updateFederatedClient,
  type FederatedAnalysisRow,
} from "@/db/queries/federated-analyses";
import {
  answerExchange,
  findFederatedDigest,
  findOpenExchange,
  insertFederatedDigest,
  type FederatedExchangeRow,
} from "@/db/queries/federated-digests";
import { ENDED_FEDERATED_STATES } from "@/db/schema/federated";
import {
  AnalysisInputError,
  gradientDigestSchema,
  hashDocument,
  parseDigest,
  PATH_POINTS,
  schemaDigestSchema,
  type DigestEncoding,
  type GradientDigest,
} from "@/lib/analysis";
import type { ClientCaller } from "@/lib/auth/client-key-guard";
import { RuleError } from "@/lib/errors";
import { recordRefusal } from "./federated-rules";
import { filesRequestOf, queueMergeWhenFilesAreIn } from "./files-round";

type Sender = Pick<ClientCaller, "analysisId" | "client">;

/**
 * Round 2 from one client — the answer to the coordinator's open request, or for a reference that
 * needs no fit a file measured at that reference, sent before any request — checked on arrival:
 * its form (finite numbers), the encoding hash it quotes, the points it was measured at, and its
 * shards against the client's round 1 (each once, with the same rows, none under the minimum) and
 * the sums' shapes; then stored, the coordinator's request marked answered, and once every
 * participant's file is in, the merge queued. A refusal names the client and shard and changes
 * nothing stored; the same digest sent again is harmless.
 */
export async function acceptGradientDigest(
  sender: Sender,
  document: unknown,
): Promise<{ repeated: boolean }> {
  const analysis = await findFederatedAnalysisById(sender.analysisId);
  if (!analysis) throw new RuleError(404, "There is no such federated analysis.");
  const sha256 = hashDocument(document);
  const stored = await findFederatedDigest(sender.client.id, "gradients");
  if (stored?.sha256 === sha256) {
    // Stored, but the answer may not have been recorded before the first reply failed.
    await answerOpenGradientsRequest(sender.client.id, sha256);
    await queueMergeWhenFilesAreIn(analysis);
    return { repeated: true };
  }
  const name = sender.client.name;
  const accepted = await recordRefusal(sender.client.id, async () => {
    if (stored) {
      throw new RuleError(409, `client "${name}" already sent its gradient digest`);
    }
    if (ENDED_FEDERATED_STATES.includes(analysis.state) || analysis.encoding === null) {
      throw new RuleError(409, `client "${name}": this analysis takes no gradient digest now`);
    }
    const digest = parseDigest(document, gradientDigestSchema, "gradient digest");
    checkEncoding(digest, name, analysis.encoding);
    checkRequest(digest, name, await findOpenExchange(sender.client.id, "gradients"), analysis);
    const round1 = await findFederatedDigest(sender.client.id, "schema");
    if (!round1) throw new RuleError(409, `client "${name}" sent no schema digest in round 1`);
    const shardRows = new Map(
      schemaDigestSchema.parse(round1.document).shards.map((shard) => [shard.id, shard.rows]),
    );
    checkShards(digest, name, shardRows, analysis.encoding);
    await insertFederatedDigest({
      clientId: sender.client.id,
      round: "gradients",
      document,
      sha256,
    });
    await answerOpenGradientsRequest(sender.client.id, sha256);
    return { repeated: false };
  });
  await queueMergeWhenFilesAreIn(analysis);
  return accepted;
}

/** Marks the coordinator's round-2 request answered by the stored digest (safe to repeat). */
async function answerOpenGradientsRequest(clientId: string, sha256: string): Promise<void> {
  const open = await findOpenExchange(clientId, "gradients");
  if (open) await answerExchange(clientId, open.id, { sha256 });
  await updateFederatedClient(clientId, { roundReached: "gradients", lastRefusal: null });
}

/**
 * The points the digest was measured at: those of the coordinator's open round-2 request, or
 * without one, for a reference that needs no fit, the reference itself (a file made offline).
 */
function checkRequest(
  digest: GradientDigest,
  client: string,
  open: FederatedExchangeRow | undefined,
  analysis: FederatedAnalysisRow,
): void {
  const measuredAt = hashDocument(digest.request);
  if (open) {
    if (measuredAt === open.requestKey) return;
    throw new AnalysisInputError(
      `client "${client}" measured at other points than the coordinator asked`,
      { expected: "the digest of the request the server sent" },
    );
  }
  const files = filesRequestOf(analysis);
  if (files === null) {
    throw new RuleError(
      409,
      `client "${client}": the coordinator has not asked for round 2 yet; the pooled optimum needs the online command (wait for its request)`,
    );
  }
  if (measuredAt !== files.key) {
    throw new AnalysisInputError(
      `client "${client}" measured round 2 at another point than this analysis's reference`,
      {
        expected:
          analysis.reference === "zero"
            ? "a gradient digest made with --at zero"
            : "a gradient digest made with --at and this analysis's reference weights",
      },
    );
  }
}

function checkEncoding(digest: GradientDigest, client: string, encoding: DigestEncoding): void {
  if (digest.client !== client) {
    throw new AnalysisInputError(
      `the gradient digest is client "${digest.client}"'s, sent with client "${client}"'s key`,
    );
  }
  for (const quoted of [digest.encodingHash, digest.request.encodingHash]) {
    if (quoted !== encoding.hash) {
      throw new AnalysisInputError(
        `client "${client}" sent digests for encoding ${quoted.slice(0, 12)}…, not this analysis's ${encoding.hash.slice(0, 12)}…`,
        { expected: "digests computed with this analysis's encoding (fetch it again)" },
      );
    }
  }
}

/** Each shard of round 1 once, with its rows, and sums of the encoding's shape. */
function checkShards(
  digest: GradientDigest,
  client: string,
  shardRows: Map<string, number>,
  encoding: DigestEncoding,
): void {
  const width = encoding.columns.length + 1;
  const parameters = width * (encoding.classes === null ? 1 : encoding.classes.length);
  const seen = new Set<string>();
  for (const shard of digest.shards) {
    const where = `client "${client}", shard "${shard.id}"`;
    if (seen.has(shard.id)) throw new AnalysisInputError(`${where} was sent twice`);
    seen.add(shard.id);
    const rows = shardRows.get(shard.id);
    if (rows === undefined) {
      throw new AnalysisInputError(`${where} was not in the client's round 1`, {
        expected: `the shards ${[...shardRows.keys()].join(", ")}`,
      });
    }
    if (shard.rows < encoding.minimumShardRows) {
      throw new AnalysisInputError(
        `${where} has ${shard.rows} rows, under the minimum of ${encoding.minimumShardRows}`,
      );
    }
    if (shard.rows !== rows) {
      throw new AnalysisInputError(`${where} has ${shard.rows} rows, ${rows} in round 1`, {
        expected: "the same rows as in round 1",
      });
    }
    const sums = [shard.atReference, ...shard.alongPath];
    if (
      shard.alongPath.length !== PATH_POINTS.length ||
      sums.some((point) => point.gradientSum.length !== parameters) ||
      shard.featureSums.length !== width - 1
    ) {
      throw new AnalysisInputError(`${where}: the digest's sums have the wrong shape`, {
        expected: `${PATH_POINTS.length} path points, gradients of ${parameters} numbers and ${width - 1} feature sums`,
      });
    }
  }
  const missing = [...shardRows.keys()].filter((id) => !seen.has(id));
  if (missing.length > 0) {
    throw new AnalysisInputError(
      `client "${client}" left out shard${missing.length > 1 ? "s" : ""} ${missing.map((id) => `"${id}"`).join(", ")} of its round 1`,
    );
  }
}
