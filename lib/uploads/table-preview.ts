import { constants, gunzipSync } from "node:zlib";
import type { DataFilePreview } from "@/db/schema/analyses";
import {
  AnalysisInputError,
  detectTableFormat,
  readParquetHead,
  readParquetLayout,
  type AsyncBuffer,
  type CsvFormat,
  type CsvFormatChoice,
} from "@/lib/analysis";
import {
  PREVIEW_BYTES,
  PREVIEW_ROWS,
  readCsvHead,
  summarizeCsvHead,
  type CsvHead,
} from "./csv-preview";

/** Reads bytes [start, end) of a stored file. */
export type ReadRange = (start: number, end: number) => Promise<Uint8Array>;

/** A table's first rows in any supported format, with column types when the format states them. */
export interface TableHead extends Omit<CsvHead, "format"> {
  /** How a CSV's text was read; null for Parquet, whose values are typed. */
  format: CsvFormat | null;
  /** Per column, numeric or not as the file's schema says (Parquet); null to infer from the rows. */
  numeric: boolean[] | null;
}

/**
 * The beginning of a stored dataset or partition map, whatever its format, read with ranged reads
 * only: a CSV's first bytes; a gzip CSV's first compressed bytes, decompressed as far as they go;
 * a Parquet file's footer and the pages holding its first rows. A CSV is read in the chosen format,
 * or the detected one.
 */
export async function readTableHead(
  readRange: ReadRange,
  totalBytes: number,
  fileName: string,
  choice: CsvFormatChoice = {},
): Promise<TableHead> {
  const bytes = await readRange(0, Math.min(totalBytes, PREVIEW_BYTES));
  const format = detectTableFormat(bytes);
  if (format === "csv") {
    return { ...readCsvHead({ bytes, totalBytes, fileName }, choice), numeric: null };
  }
  if (format === "csv.gz") {
    const text = decompressBeginning(bytes, fileName);
    const whole = bytes.length === totalBytes && text.length <= PREVIEW_BYTES;
    const head = readCsvHead(
      {
        bytes: text.subarray(0, PREVIEW_BYTES),
        // Only "is this all of it" matters here: any larger size marks the text as cut.
        totalBytes: whole ? text.length : PREVIEW_BYTES + 1,
        fileName,
      },
      choice,
    );
    return { ...head, numeric: null };
  }
  const file: AsyncBuffer = {
    byteLength: totalBytes,
    slice: async (start, end = totalBytes) => {
      const slice = await readRange(start, end);
      return slice.buffer.slice(
        slice.byteOffset,
        slice.byteOffset + slice.byteLength,
      ) as ArrayBuffer;
    },
  };
  const layout = await readParquetLayout(file, fileName);
  const rows = await readParquetHead(file, layout, fileName, PREVIEW_ROWS);
  const totalRows = layout.groupStarts[layout.groupStarts.length - 1];
  return {
    header: layout.columns,
    rows,
    truncated: totalRows > rows.length,
    format: null,
    numeric: layout.numeric,
  };
}

/** A preview of a table head: column types (the schema's where it has one) and the first rows. */
export function summarizeTableHead(head: TableHead): DataFilePreview {
  const preview = summarizeCsvHead(head);
  const numeric = head.numeric;
  if (numeric === null) return preview;
  return {
    ...preview,
    columns: preview.columns.map((column, index) => ({
      ...column,
      type: numeric[index] ? "numeric" : "categorical",
    })),
  };
}

/** Decompresses what a cut-off gzip stream holds so far (zlib's sync flush tolerates the cut). */
function decompressBeginning(bytes: Uint8Array, fileName: string): Uint8Array {
  try {
    return gunzipSync(bytes, { finishFlush: constants.Z_SYNC_FLUSH });
  } catch (error) {
    throw new AnalysisInputError(
      `the gzip data cannot be decompressed (${error instanceof Error ? error.message : "unknown problem"})`,
      { file: fileName, expected: "a gzip-compressed CSV (.csv.gz)" },
    );
  }
}
