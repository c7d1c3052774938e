import { AnalysisInputError, listFirst } from "./errors";
import { isMissingToken, trimToken } from "./tokens";
import { quoteValue } from "./quote-value";
import { readTable, type TableSource } from "./table-reader";

/**
 * A partition map (methods.md §1) as read from its CSV: row id → shard. Validation that needs the
 * dataset (unknown ids, unassigned rows) happens while the dataset is read, through `lookUp` and
 * `findUnmatched`.
 */
export interface PartitionMap {
  readonly fileName: string;
  /** Shard ids in first-appearance order; `shardCodeOf` values index this list. */
  readonly shardIds: string[];
  /**
   * Shard code of a row id and marks its entry as matched; -1 when the map does not list the id,
   * -2 when an earlier data row already matched it (the dataset repeats the id).
   */
  lookUp(rowId: string): number;
  /** Row ids listed in the map that no data row matched. */
  findUnmatched(): string[];
}

const MAX_LISTED_DUPLICATES = 5;

/**
 * Reads a `row_id,shard` table (CSV, gzip CSV or Parquet). Row ids and shard ids are trimmed strings; with `byRowIndex` the row id
 * must be a 0-based data-row index and is stored in canonical form, so "007" matches row 7.
 * Duplicate row ids and missing values are AnalysisInputErrors naming the first offenders.
 */
export async function readPartitionMap(
  source: TableSource,
  fileName: string,
  { byRowIndex }: { byRowIndex: boolean },
): Promise<PartitionMap> {
  const entryOfRowId = new Map<string, number>();
  const shardCodes: number[] = [];
  const shardCodeOfId = new Map<string, number>();
  const shardIds: string[] = [];
  const duplicates: string[] = [];
  let duplicateCount = 0;
  let rowIdColumn = -1;
  let shardColumn = -1;

  await readTable(source, fileName, {
    onHeader(columns) {
      rowIdColumn = columns.findIndex((column) => column.toLowerCase() === "row_id");
      shardColumn = columns.findIndex((column) => column.toLowerCase() === "shard");
      if (rowIdColumn < 0 || shardColumn < 0) {
        throw new AnalysisInputError(`the header is ${quoteValue(columns.join(","))}`, {
          file: fileName,
          expected: "a header row_id,shard",
        });
      }
    },
    onRow(fields, rowIndex) {
      const rowIdToken = trimToken(fields[rowIdColumn]);
      const shard = trimToken(fields[shardColumn]);
      if (isMissingToken(rowIdToken)) {
        throw new AnalysisInputError("the row id is missing", {
          file: fileName,
          row: rowIndex,
          column: "row_id",
          expected: byRowIndex ? "a 0-based data row index" : "a value of the dataset's id column",
        });
      }
      if (shard === "") {
        throw new AnalysisInputError("the shard is empty", {
          file: fileName,
          row: rowIndex,
          column: "shard",
          expected: "a shard id",
        });
      }
      const rowId = byRowIndex ? canonicalRowIndex(rowIdToken, fileName, rowIndex) : rowIdToken;
      if (entryOfRowId.has(rowId)) {
        duplicateCount++;
        if (duplicates.length < MAX_LISTED_DUPLICATES) duplicates.push(rowId);
        return;
      }
      let shardCode = shardCodeOfId.get(shard);
      if (shardCode === undefined) {
        shardCode = shardIds.length;
        shardIds.push(shard);
        shardCodeOfId.set(shard, shardCode);
      }
      entryOfRowId.set(rowId, shardCodes.length);
      shardCodes.push(shardCode);
    },
  });

  if (duplicateCount > 0) {
    throw new AnalysisInputError(
      `${duplicateCount} row ids are listed more than once: ${listFirst(duplicates, duplicateCount)}`,
      { file: fileName, column: "row_id", expected: "every row assigned exactly once" },
    );
  }

  const matched = new Uint8Array(shardCodes.length);
  return {
    fileName,
    shardIds,
    lookUp(rowId) {
      const entry = entryOfRowId.get(rowId);
      if (entry === undefined) return -1;
      if (matched[entry] === 1) return -2;
      matched[entry] = 1;
      return shardCodes[entry];
    },
    findUnmatched() {
      const unmatched: string[] = [];
      for (const [rowId, entry] of entryOfRowId) if (matched[entry] === 0) unmatched.push(rowId);
      return unmatched;
    },
  };
}

function canonicalRowIndex(token: string, fileName: string, rowIndex: number): string {
  if (!/^\+?\d+$/.test(token)) {
    throw new AnalysisInputError(`the row id ${quoteValue(token)} is not a row index`, {
      file: fileName,
      row: rowIndex,
      column: "row_id",
      expected: "a 0-based data row index (the dataset has no id column)",
    });
  }
  return String(Number(token));
}
