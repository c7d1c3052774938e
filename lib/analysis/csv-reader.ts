import { Readable } from "node:stream";
import Papa from "papaparse";
import { AnalysisInputError } from "./errors";
import { trimToken } from "./tokens";

export interface CsvRowHandler {
  /** Receives the header's trimmed column names. */
  onHeader(columns: string[]): void;
  /** Receives each data row's raw fields (untrimmed) and its 0-based index (header excluded). */
  onRow(fields: string[], rowIndex: number): void;
  /** Receives how many characters have been read so far (for progress). */
  onProgress?(charactersRead: number): void;
}

/**
 * Reads a CSV with a header row from a stream, one parsed chunk at a time, so a file of any size is
 * never held whole in memory. The delimiter is detected by papaparse (comma, semicolon, tab, …);
 * blank lines are skipped. A row whose field count differs from the header's, an unterminated
 * quote, a missing header or duplicate column names are AnalysisInputErrors naming the file.
 * Resolves with the number of data rows. With `part`, reads one part of a file cut at line ends.
 */
/** For reading one part of a CSV cut at line ends: its header comes from the file's first line. */
export interface CsvPartOptions {
  /** The file's header; the stream then holds data rows only, and `onHeader` is not called. */
  header: string[];
  /** The delimiter found in the file's first lines, so every part splits its rows alike. */
  delimiter: string;
  /** Index of the part's first data row in the whole file. */
  firstRowIndex: number;
}

export function readCsvStream(
  stream: Readable,
  fileName: string,
  handler: CsvRowHandler,
  part?: CsvPartOptions,
): Promise<number> {
  return new Promise((resolve, reject) => {
    let header: string[] | null = part ? part.header : null;
    const firstRowIndex = part ? part.firstRowIndex : 0;
    let rowIndex = firstRowIndex;
    let charactersRead = 0;
    let failed = false;

    stream.setEncoding("utf8");
    const text = relayWithReadAhead(stream);
    const fail = (error: unknown) => {
      if (failed) return;
      failed = true;
      stream.destroy();
      text.destroy();
      reject(error);
    };
    stream.on("error", fail);
    if (handler.onProgress) {
      const onProgress = handler.onProgress;
      stream.on("data", (chunk: string) => {
        charactersRead += chunk.length;
        onProgress(charactersRead);
      });
    }

    Papa.parse<string[]>(text, {
      header: false,
      delimiter: part?.delimiter,
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
          for (const fields of results.data) {
            if (header === null) {
              header = readHeader(fields, fileName);
              handler.onHeader(header);
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
