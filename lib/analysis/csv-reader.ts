import { Readable } from "node:stream";
import Papa from "papaparse";
import { decodeText } from "./decode-text";
import { AnalysisInputError } from "./errors";
import {
  DELIMITERS,
  type CsvFormat,
  type CsvFormatChoice,
  type DecimalMark,
  type Delimiter,
} from "./text-format";
import { trimToken } from "./tokens";

/** Data rows of the first parsed chunk looked at to detect a decimal comma. */
export const DECIMAL_MARK_SAMPLE_ROWS = 200;
const DECIMAL_COMMA_NUMBER = /^\s*[-+]?\d*,\d+\s*$/;
const DECIMAL_POINT_NUMBER = /^\s*[-+]?\d*\.\d+\s*$/;

export interface CsvRowHandler {
  /** Receives the header's trimmed column names and the format the text is read in (none for Parquet). */
  onHeader(columns: string[], format?: CsvFormat): void;
  /** Receives each data row's raw fields (untrimmed) and its 0-based index (header excluded). */
  onRow(fields: string[], rowIndex: number): void;
  /** Receives how many characters have been read so far (for progress). */
  onProgress?(charactersRead: number): void;
}

/**
 * Reads a CSV with a header row from a stream, one parsed chunk at a time, so a file of any size is
 * never held whole in memory. The bytes are decoded strictly (decode-text.ts). Unless chosen, the
 * delimiter (comma, semicolon or tab) is detected by papaparse from the first chunk, and the decimal
 * mark from the first rows (detectDecimalMark); blank lines are skipped. A row whose field count
 * differs from the header's, an unterminated quote, a missing header or duplicate column names are
 * AnalysisInputErrors naming the file. Resolves with the number of data rows. With `part`, reads
 * one UTF-8 part of a file cut at line ends.
 */
/** For reading one part of a CSV cut at line ends: its header comes from the file's first line. */
export interface CsvPartOptions {
  /** The file's header; the stream then holds data rows only, and `onHeader` is not called. */
  header: string[];
  /** The delimiter found in the file's first lines, so every part splits its rows alike. */
  delimiter: string;
  /** Index of the part's first data row in the whole file. */
  firstRowIndex: number;
  /** Where the part starts in the file, so a message can give a byte offset in the file. */
  startByte: number;
}

export function readCsvStream(
  stream: Readable,
  fileName: string,
  handler: CsvRowHandler,
  part?: CsvPartOptions,
  choice: CsvFormatChoice = {},
  /** Index in the whole file of the first data row, when the stream is a part read with its header. */
  firstRowIndex = part?.firstRowIndex ?? 0,
): Promise<number> {
  return new Promise((resolve, reject) => {
    let header: string[] | null = part ? part.header : null;
    let rowIndex = firstRowIndex;
    let charactersRead = 0;
    let failed = false;

    const encoding = part ? "utf-8" : (choice.encoding ?? "utf-8");
    const decoded = decodeText(stream, fileName, encoding, part?.startByte);
    const text = relayWithReadAhead(decoded);
    const fail = (error: unknown) => {
      if (failed) return;
      failed = true;
      stream.destroy();
      decoded.destroy();
      text.destroy();
      reject(error);
    };
    stream.on("error", fail);
    decoded.on("error", fail);
    if (handler.onProgress) {
      const onProgress = handler.onProgress;
      decoded.on("data", (chunk: string) => {
        charactersRead += chunk.length;
        onProgress(charactersRead);
      });
    }

    Papa.parse<string[]>(text, {
      header: false,
      delimiter: part?.delimiter ?? choice.delimiter,
      delimitersToGuess: [...DELIMITERS],
      skipEmptyLines: true,
      chunk(results, parser) {
        if (failed) return;
        try {
          const quoteProblem = results.errors.find((problem) => problem.type === "Quotes");
          if (quoteProblem) {
            throw new AnalysisInputError("a quoted field is not closed", {
              file: fileName,
              row: Math.max(0, (quoteProblem.row ?? 0) + rowIndex - (header ? 0 : 1)),
              expected: 'a closing " before the end of the file',
            });
          }
          for (const [index, fields] of results.data.entries()) {
            if (header === null) {
              header = readHeader(fields, fileName);
              const delimiter = results.meta.delimiter as Delimiter;
              const decimalMark =
                choice.decimalMark ??
                detectDecimalMark(
                  delimiter,
                  results.data.slice(index + 1, index + 1 + DECIMAL_MARK_SAMPLE_ROWS),
                );
              handler.onHeader(header, { encoding, delimiter, decimalMark });
              continue;
            }
            if (fields.length !== header.length) {
              throw new AnalysisInputError(`the row has ${fields.length} fields`, {
                file: fileName,
                row: rowIndex,
                expected: `${header.length} fields, like the header`,
              });
            }
            handler.onRow(fields, rowIndex);
            rowIndex++;
          }
        } catch (error) {
          // Fail before aborting: papaparse's abort() calls `complete` synchronously.
          fail(error);
          parser.abort();
        }
      },
      complete() {
        if (failed) return;
        if (header === null) {
          fail(
            new AnalysisInputError("the file is empty", {
              file: fileName,
              expected: "a header row",
            }),
          );
          return;
        }
        resolve(rowIndex - firstRowIndex);
      },
      error(error: Error) {
        fail(error);
      },
    });
  });
}

/**
 * The decimal mark of a file's numbers, from its first data rows: a comma only when semicolons delimit
 * (with comma-delimited fields a decimal comma cannot occur unquoted), some field is a number written
 * with a decimal comma ("17,99") and none with a decimal point ("17.99"); a point otherwise.
 */
export function detectDecimalMark(delimiter: string, rows: string[][]): DecimalMark {
  if (delimiter !== ";") return ".";
  let commas = 0;
  for (const fields of rows) {
    for (const field of fields) {
      if (DECIMAL_POINT_NUMBER.test(field)) return ".";
      if (DECIMAL_COMMA_NUMBER.test(field)) commas++;
    }
  }
  return commas > 0 ? "," : ".";
}

/** Text held back for papaparse before the source is paused (characters). */
const MAX_PENDING_CHARACTERS = 1 << 22;

/**
 * Passes a text stream on one event-loop turn late, joining what arrived meanwhile into one string.
 * Papaparse parses synchronously as text arrives; fed directly, a file stream starts its next read
 * only after the parse of the previous chunk, and waits for it. Deferred, the next read runs in the
 * background during the parse, and papaparse gets fewer, larger strings.
 */
function relayWithReadAhead(source: Readable): Readable {
  const relay = new Readable({ read() {} });
  let pending: string[] = [];
  let pendingLength = 0;
  let scheduled = false;
  let ended = false;
  const flush = () => {
    scheduled = false;
    if (pending.length > 0) {
      const text = pending.length === 1 ? pending[0] : pending.join("");
      pending = [];
      pendingLength = 0;
      relay.push(text);
    }
    if (ended) relay.push(null);
    else if (source.isPaused()) source.resume();
  };
  const schedule = () => {
    if (scheduled) return;
    scheduled = true;
    setImmediate(flush);
  };
  source.on("data", (chunk: string) => {
    pending.push(chunk);
    pendingLength += chunk.length;
    if (pendingLength >= MAX_PENDING_CHARACTERS) source.pause();
    schedule();
  });
  source.on("end", () => {
    ended = true;
    schedule();
  });
  return relay;
}

/** The header row's column names, trimmed; empty or repeated names are input errors. */
export function readHeader(fields: string[], fileName: string): string[] {
  const columns = fields.map(trimToken);
  const seen = new Set<string>();
  columns.forEach((column, index) => {
    if (column === "") {
      throw new AnalysisInputError(`header column ${index + 1} has no name`, {
        file: fileName,
        expected: "a name for every column",
      });
    }
    if (seen.has(column)) {
      throw new AnalysisInputError("the header names this column twice", {
        file: fileName,
        column,
        expected: "unique column names",
      });
    }
    seen.add(column);
  });
  return columns;
}
