import Papa from "papaparse";
import type { PartitionSummary } from "@/lib/analysis";
import { SHARD_ID_HEADING, shardColumnsFor, type ShardTableRow } from "./shard-table";

const FORMULA_TRIGGERS = ["=", "+", "-", "@", "\t", "\r"];

/**
 * Keeps a spreadsheet from running a text cell as a formula: a cell that starts with = + - @ tab
 * or carriage return gets a leading single quote, which spreadsheets show as text. This is OWASP's
 * guidance on CSV injection (owasp.org/www-community/attacks/CSV_Injection). Shard ids and label
 * names come from users' files, so every text cell goes through here; numbers the engine computed
 * are written as numbers and left alone.
 */
export function neutralizeSpreadsheetFormula(cell: string): string {
  return FORMULA_TRIGGERS.some((trigger) => cell.startsWith(trigger)) ? `'${cell}` : cell;
}

/**
 * The per-shard table as CSV: a header of the page table's headings for the report's task, one row
 * per shard in stored order, numbers at full precision so the file reads back exactly. Papa's
 * unparse does the quoting (commas, quotes, line breaks inside a cell).
 */
export function formatShardsCsv(
  rows: ShardTableRow[],
  task: PartitionSummary["dataset"]["task"],
): string {
  const columns = shardColumnsFor(task);
  return Papa.unparse({
    fields: [SHARD_ID_HEADING, ...columns.map((column) => column.heading)],
    data: rows.map((row) => [
      neutralizeSpreadsheetFormula(row.shardId),
      ...columns.map((column) => row[column.key]),
    ]),
  });
}
