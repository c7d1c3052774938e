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
  const names = Array.from({ length: shardCount }, (_, m) => formatShardId(m, shardCount));
  const lines = ["row_id,shard"];
  rowIds.forEach((id, row) => lines.push(`${quoteField(id)},${names[assignment[row]]}`));
  return `${lines.join("\n")}\n`;
}

function quoteField(value: string): string {
  return /[",\r\n]/.test(value) ? `"${value.replace(/"/g, '""')}"` : value;
}
