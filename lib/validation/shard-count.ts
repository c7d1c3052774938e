import type { DataFilePreview } from "@/db/schema/analyses";
import { quoteValue } from "@/lib/analysis/browser";

/**
 * The form's and the API's sentence when a plan asks for more shards per round than there are.
 *
 * Example: 25, 20, 'column "part" of "digits.csv"' → 'Shards per round (M) is 25, but column
 * "part" of "digits.csv" names 20 shards: choose at most 20, or let every shard take part.'
 */
export function describeTooFewShards(participants: number, shards: number, where: string): string {
  return (
    `Shards per round (M) is ${participants}, but ${where} names ${shards} ` +
    `${shards === 1 ? "shard" : "shards"}: choose at most ${shards}, or let every shard take part.`
  );
}

/** Where a layout's shards are named, as the messages say it: 'column "part" of "digits.csv"'. */
export function describeShardSource(column: string, fileName: string): string {
  return `column ${quoteValue(column)} of ${quoteValue(fileName)}`;
}

/** How many shards a preview shows in a column: all of them when the preview read the whole file. */
export interface PreviewedShards {
  count: number;
  /** True when the preview holds the whole file, so the count is the layout's shard count. */
  complete: boolean;
  where: string;
}

/**
 * The shards a layout's preview shows: the dataset's shard column, or a partition map's `shard`
 * column (matched case-insensitively, as the engine does). Undefined without a preview or column.
 */
export function previewedShards(
  preview: DataFilePreview | null | undefined,
  column: string,
  fileName: string,
): PreviewedShards | undefined {
  const found = preview?.columns.find((entry) => entry.name.toLowerCase() === column.toLowerCase());
  if (!preview || !found) return undefined;
  return {
    count: found.distinct,
    complete: !preview.truncated,
    where: describeShardSource(found.name, fileName),
  };
}
