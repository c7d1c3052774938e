import { formatShardId, type ShardAssignment } from "./layout-rows";

/**
 * A candidate as a partition map CSV (methods.md §1): header `row_id,shard`, one line per kept row
 * in file order, the row id being the id column's value or the 0-based data row index. Ids are
 * quoted when they hold a comma, quote or line break (RFC 4180).
 */
export function writeLayoutMap(
  rowIds: readonly string[],
  assignment: ShardAssignment,
  shardCount: number,
): string {
  // Each line's end: the comma, the shard's name, the line feed.
  const lineEnds = Array.from(
    { length: shardCount },
    (_, m) => `,${formatShardId(m, shardCount)}\n`,
  );
  // One growing string: a few times faster than an array of lines joined (the CLI writes eight
  // maps of the whole dataset).
  let text = "row_id,shard\n";
  for (let row = 0; row < rowIds.length; row++) {
    text += quoteField(rowIds[row]) + lineEnds[assignment[row]];
  }
  return text;
}

function quoteField(value: string): string {
  return /[",\r\n]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}
