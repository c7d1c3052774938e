import "server-only";
import type { DataFilePreview } from "@/db/schema/analyses";
import { AnalysisInputError, countShardsUpTo } from "@/lib/analysis";
import { RuleError } from "@/lib/errors";
import { getObjectStream } from "@/lib/storage";
import { describeShardSource, describeTooFewShards } from "@/lib/validation/shard-count";

/**
 * Files at most this large are read (as far as needed) to count their shards before queueing; a
 * larger one is left to the engine's own check, so starting an analysis never waits on a long read.
 * Reading stops once M shards are seen, so the full read happens only when M is too large.
 */
export const PARTICIPANT_CHECK_MAX_BYTES = 64 * 1024 * 1024;

/** Where the shards come from: a dataset's shard column or a partition map's `shard` column. */
export interface ShardSource {
  fileName: string;
  objectKey: string;
  sizeBytes: number;
  preview: DataFilePreview | null;
  column: string;
}

/**
 * Refuses a plan whose M (participants per round) is above the shard count, on the field
 * "options.participants", before anything is queued. The preview answers when it already shows M
 * shards or holds the whole file; otherwise the file is read until M shards are seen (at most
 * PARTICIPANT_CHECK_MAX_BYTES). A shard count the file cannot give (too large) is left to the engine.
 */
export async function checkParticipants(participants: number, source: ShardSource): Promise<void> {
  const previewed = source.preview?.columns.find(
    (column) => column.name.toLowerCase() === source.column.toLowerCase(),
  );
  if (previewed && previewed.distinct >= participants) return;
  let shards: number;
  if (previewed && source.preview && !source.preview.truncated) {
    shards = previewed.distinct;
  } else if (source.sizeBytes <= PARTICIPANT_CHECK_MAX_BYTES) {
    const { body } = await getObjectStream(source.objectKey);
    try {
      shards = (await countShardsUpTo(body, source.fileName, source.column, participants)).count;
    } catch (error) {
      // A file the engine cannot read fails the run with the engine's own message.
      if (error instanceof AnalysisInputError) return;
      throw error;
    }
  } else {
    return;
  }
  if (shards >= participants) return;
  throw new RuleError(
    422,
    describeTooFewShards(participants, shards, describeShardSource(source.column, source.fileName)),
    "options.participants",
  );
}
