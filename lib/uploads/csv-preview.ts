import Papa from "papaparse";
import type { DataFilePreview } from "@/db/schema/analyses";
import {
  AnalysisInputError,
  DECIMAL_MARK_SAMPLE_ROWS,
  DELIMITERS,
  describeNonText,
  detectDecimalMark,
  isMissingToken,
  parseNumberToken,
  readHeader,
  trimToken,
  type CsvFormat,
  type CsvFormatChoice,
  type DecimalMark,
  type Delimiter,
  type TextEncodingName,
} from "@/lib/analysis";

/** How much of a file's beginning the server reads for a preview. */
export const PREVIEW_BYTES = 256 * 1024;
/** Rows kept in the stored preview (column types use every complete row read). */
export const PREVIEW_ROWS = 20;
/** Longer preview values are cut, so a stray text blob cannot bloat the stored preview. */
const PREVIEW_VALUE_CHARS = 120;

type PreviewColumn = DataFilePreview["columns"][number];

/**
 * Detected type and distinct count of each column over the given rows, with methods.md §1's rules:
 * missing tokens (empty, NA, N/A, NaN, null, None) are skipped; a column is numeric when every other
 * value parses as a finite number (with the file's decimal mark), "empty" when it has no other
 * value, categorical otherwise.
 */
export function describeColumns(
  header: string[],
  rows: string[][],
  decimalMark: DecimalMark = ".",
): PreviewColumn[] {
  return header.map((name, column) => {
    const distinct = new Set<string>();
    let numeric = true;
    for (const row of rows) {
      const value = trimToken(row[column] ?? "");
      if (isMissingToken(value)) continue;
      distinct.add(value);
      if (numeric && !Number.isFinite(parseNumberToken(value, decimalMark))) numeric = false;
    }
    const type = distinct.size === 0 ? "empty" : numeric ? "numeric" : "categorical";
    return { name, type, distinct: distinct.size };
  });
}

/**
 * More than 1% control characters other than tab, line feed, form feed and carriage return: not
 * text, even without the NUL bytes and signatures that describeNonText recognizes.
 */
function hasManyControlCharacters(bytes: Uint8Array): boolean {
  let control = 0;
  for (const byte of bytes) {
    if (byte < 32 && byte !== 9 && byte !== 10 && byte !== 12 && byte !== 13) control++;
  }
  return control > bytes.length / 100;
}

function cutPreviewValue(value: string): string {
  return value.length > PREVIEW_VALUE_CHARS ? `${value.slice(0, PREVIEW_VALUE_CHARS)}…` : value;
}

export interface CsvPreviewSource {
  /** The file's first bytes (at most PREVIEW_BYTES). */
  bytes: Uint8Array;
  /** The whole file's size, to know whether `bytes` is all of it. */
  totalBytes: number;
  /** The name the user knows the file by, used in every message. */
  fileName: string;
}

/** The header and complete data rows in a CSV's first bytes, with the engine's parsing rules. */
export interface CsvHead {
  header: string[];
  rows: string[][];
  /** True when the bytes are not the whole file. */
  truncated: boolean;
  /**
   * How the text was read: the chosen encoding, delimiter and decimal mark, or what was detected
   * (the delimiter and decimal mark as the engine detects them, methods.md §1).
   */
  format: CsvFormat;
}

const UTF16_BOMS = [
  [0xff, 0xfe],
  [0xfe, 0xff],
];

/**
 * The encoding a file's first bytes are in: UTF-16 when they start with its byte-order mark, UTF-8
 * when they decode as UTF-8, Windows-1252 otherwise (every byte sequence is Windows-1252 text, and
 * it is what a spreadsheet on Windows saves as "CSV"). The engine itself reads UTF-8 unless told
 * otherwise, so the form offers this guess as the choice.
 */
export function detectEncoding(bytes: Uint8Array, truncated: boolean): TextEncodingName {
  if (UTF16_BOMS.some(([first, second]) => bytes[0] === first && bytes[1] === second)) {
    return "utf-16";
  }
  try {
    // Streaming holds back a character cut by the end of the bytes read instead of refusing it.
    new TextDecoder("utf-8", { fatal: true }).decode(bytes, { stream: truncated });
    return "utf-8";
  } catch {
    return "windows-1252";
  }
}

/**
 * The text of a file's complete lines among its first bytes, decoded in `encoding`. Cut bytes end
 * at the last line feed (for UTF-8 and Windows-1252 a line feed byte is never part of another
 * character); UTF-16 is decoded as a stream, which holds back a cut character, and then cut at its
 * last line break. Returns null when the bytes hold no line break at all.
 */
function decodeCompleteLines(
  bytes: Uint8Array,
  truncated: boolean,
  encoding: TextEncodingName,
  fileName: string,
): string | null {
  if (encoding === "utf-16") {
    const label = bytes[0] === 0xfe && bytes[1] === 0xff ? "utf-16be" : "utf-16le";
    const text = new TextDecoder(label).decode(bytes, { stream: truncated });
    if (!truncated) return text;
    const lastLineEnd = text.lastIndexOf("\n");
    return lastLineEnd < 0 ? null : text.slice(0, lastLineEnd + 1);
  }
  let complete = bytes;
  if (truncated) {
    const lastLineEnd = bytes.lastIndexOf(10);
    if (lastLineEnd < 0) return null;
    complete = bytes.subarray(0, lastLineEnd + 1);
  }
  try {
    return new TextDecoder(encoding, { fatal: true }).decode(complete);
  } catch {
    throw new AnalysisInputError("the text is not valid UTF-8", {
      file: fileName,
      expected: "UTF-8 text, or the file's encoding chosen (windows-1252, utf-16)",
    });
  }
}

/**
 * Parses the beginning of a CSV the way the engine will parse the whole file (papaparse with
 * delimiter detection, blank lines skipped, trimmed unique header names), keeping complete lines
 * only. The encoding, delimiter and decimal mark are the user's choice where given, detected
 * otherwise. Problems the engine would also reject are AnalysisInputErrors naming the file, row and
 * what was expected: binary content, no header, empty or repeated column names, unclosed quotes,
 * rows with the wrong number of fields, a header without data rows.
 */
export function readCsvHead(
  { bytes, totalBytes, fileName }: CsvPreviewSource,
  choice: CsvFormatChoice = {},
): CsvHead {
  const truncated = totalBytes > bytes.length;
  const encoding = choice.encoding ?? detectEncoding(bytes, truncated);
  const nonText =
    describeNonText(bytes, encoding) ??
    (encoding !== "utf-16" && hasManyControlCharacters(bytes) ? "binary data" : null);
  if (nonText !== null) {
    throw new AnalysisInputError(`not a text CSV: ${nonText}`, {
      file: fileName,
      expected: "a CSV file saved as text, e.g. exported with “Save as CSV”",
    });
  }
  const text = decodeCompleteLines(bytes, truncated, encoding, fileName);
  if (text === null) {
    throw new AnalysisInputError(
      `the first line is longer than ${Math.round(bytes.length / 1024)} KB`,
      { file: fileName, expected: "a CSV file whose lines end with line breaks" },
    );
  }
  const parsed = Papa.parse<string[]>(text, {
    header: false,
    delimiter: choice.delimiter,
    skipEmptyLines: true,
    delimitersToGuess: [...DELIMITERS],
  });
  let records = parsed.data;
  const quoteProblem = parsed.errors.find((problem) => problem.type === "Quotes");
  if (quoteProblem) {
    const problemRow = quoteProblem.row ?? records.length - 1;
    // A quoted field with line breaks may run past the bytes read: only the rows before it count.
    if (truncated) records = records.slice(0, problemRow);
    else {
      throw new AnalysisInputError("a quoted field is not closed", {
        file: fileName,
        row: Math.max(0, problemRow - 1),
        expected: 'a closing " before the end of the file',
      });
    }
  }
  if (records.length === 0) {
    throw new AnalysisInputError("the file has no header row (it holds only blank lines)", {
      file: fileName,
      expected: "a header row naming the columns",
    });
  }
  const header = readHeader(records[0], fileName);
  const rows = records.slice(1);
  rows.forEach((fields, row) => {
    if (fields.length !== header.length) {
      throw new AnalysisInputError(`the row has ${fields.length} fields`, {
        file: fileName,
        row,
        expected: `${header.length} fields, like the header`,
      });
    }
  });
  if (!truncated && rows.length === 0) {
    throw new AnalysisInputError("the file has a header but no data rows", {
      file: fileName,
      expected: "at least one data row below the header",
    });
  }
  const delimiter = parsed.meta.delimiter as Delimiter;
  const decimalMark =
    choice.decimalMark ?? detectDecimalMark(delimiter, rows.slice(0, DECIMAL_MARK_SAMPLE_ROWS));
  return { header, rows, truncated, format: { encoding, delimiter, decimalMark } };
}

/** A preview of a parsed CSV head: detected columns over every row read, and the first rows. */
export function summarizeCsvHead({
  header,
  rows,
  truncated,
  format,
}: Omit<CsvHead, "format"> & { format: CsvFormat | null }): DataFilePreview {
  return {
    columns: describeColumns(header, rows, format?.decimalMark ?? "."),
    rows: rows.slice(0, PREVIEW_ROWS).map((row) => row.map(cutPreviewValue)),
    truncated,
    ...(format ? { format } : {}),
  };
}
