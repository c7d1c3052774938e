import { AnalysisInputError } from "./errors";
import { quoteValue } from "./quote-value";
import { readTable, type TableSource } from "./table-reader";
import { isMissingToken, trimToken } from "./tokens";

/** Thrown from a row handler to stop reading once enough shards are seen; never escapes. */
class EnoughShards extends Error {}

/**
 * Counts the distinct shards named in a table's column (a dataset's shard column, or a partition
 * map's `shard`, matched case-insensitively as the engine does), stopping as soon as `enough` are
 * seen: a plan's M needs no more, and a large file is then read only as far as it must be. Values
 * are trimmed, missing tokens skipped (methods.md §1). The count is the file's: rows the analysis
 * later leaves out can only lower it.
 *
 * Example: a shard column "north, south, north, east" with enough = 5 gives { count: 3, complete: true }.
 */
export async function countShardsUpTo(
  source: TableSource,
  fileName: string,
  column: string,
  enough: number,
): Promise<{ count: number; complete: boolean }> {
  const shards = new Set<string>();
  let index = -1;
  try {
    await readTable(source, fileName, {
      onHeader(columns) {
        index = columns.findIndex((name) => name.toLowerCase() === column.toLowerCase());
        if (index < 0) {
          throw new AnalysisInputError(`there is no column ${quoteValue(column)}`, {
            file: fileName,
            expected: `a column named ${quoteValue(column)}`,
          });
        }
      },
      onRow(fields) {
        const shard = trimToken(fields[index] ?? "");
        if (isMissingToken(shard)) return;
        shards.add(shard);
        if (shards.size >= enough) throw new EnoughShards();
      },
    });
  } catch (error) {
    if (error instanceof EnoughShards) return { count: shards.size, complete: false };
    throw error;
  }
  return { count: shards.size, complete: true };
}
