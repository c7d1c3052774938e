import Papa from "papaparse";
import { SHARD_COLUMNS, type ShardTableRow } from "./shard-table";

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
 * The per-shard table as CSV: a header of the JSON summary's key names (`shard` for the id), one
 * row per shard in stored order, numbers at full precision so the file reads back exactly. Papa's
 * unparse does the quoting (commas, quotes, line breaks inside a cell).
 */
export function formatShardsCsv(rows: ShardTableRow[]): string {
  return Papa.unparse({
    fields: ["shard", ...SHARD_COLUMNS.map((column) => column.csvHeader)],
    data: rows.map((row) => [
      neutralizeSpreadsheetFormula(row.shardId),
      ...SHARD_COLUMNS.map((column) => row[column.key]),
    ]),
  });
}
