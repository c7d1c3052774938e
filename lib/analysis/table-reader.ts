import { createReadStream } from "node:fs";
import { open } from "node:fs/promises";
import { Readable } from "node:stream";
import { createGunzip } from "node:zlib";
import { readCsvStream, type CsvRowHandler } from "./csv-reader";
import type { CsvFormatChoice } from "./text-format";
import { AnalysisInputError } from "./errors";
import {
  readParquetFile,
  readParquetPart,
  readParquetStream,
  type ParquetPart,
} from "./parquet-reader";

/**
 * Where a table's bytes come from: a stream read once from its start (an upload, an S3 object), a
 * local file, which Parquet reads where it needs to (its footer first) instead of copying it, or
 * some row groups of a Parquet file read by byte ranges (a part of an analysis shared by workers).
 */
export type TableSource = Readable | LocalFile | ParquetPart;

export interface LocalFile {
  path: string;
}

/** The formats a dataset or partition map may come in, told apart by their first bytes. */
export type TableFormat = "csv" | "csv.gz" | "parquet";

/** Receives the table's header and rows; `onProgress` gets the input bytes consumed so far. */
export type TableRowHandler = CsvRowHandler;

const GZIP_MAGIC = [0x1f, 0x8b];
const PARQUET_MAGIC = [0x50, 0x41, 0x52, 0x31]; // "PAR1"
const SNIFFED_BYTES = PARQUET_MAGIC.length;

/**
 * Tells a table's format from its first bytes: gzip's magic number, Parquet's "PAR1", else text
 * (CSV). The content decides, not the file name, so a renamed file is still read right.
 */
export function detectTableFormat(head: Uint8Array): TableFormat {
  const startsWith = (magic: number[]) => magic.every((byte, index) => head[index] === byte);
  if (startsWith(PARQUET_MAGIC)) return "parquet";
  if (startsWith(GZIP_MAGIC)) return "csv.gz";
  return "csv";
}

/**
 * Reads a dataset or partition map in any supported format, row by row, with the same header and
 * field rules: CSV as it is, gzip-compressed CSV decompressed as it streams, Parquet one row group
 * at a time with each value given as the text a CSV of the same table would hold. Every consumer of
 * tables (methods.md §1) reads through here, so each format reaches the same rules.
 * Resolves with the number of data rows.
 */
export async function readTable(
  source: TableSource,
  fileName: string,
  handler: TableRowHandler,
  /** A text file's encoding, delimiter and decimal mark as chosen; what is not given is detected. */
  textFormat: CsvFormatChoice = {},
  /**
   * Index in the whole file of the first data row, when a CSV source is a part of a file (its
   * header, then whole lines from further on): rows, and the messages naming them, are numbered as
   * in the whole file.
   */
  firstRowIndex = 0,
): Promise<number> {
  if (isParquetPart(source)) return readParquetPart(source, fileName, handler);
  if (isLocalFile(source)) return readLocalTable(source, fileName, handler, textFormat);
  const { head, stream } = await peekStream(source, SNIFFED_BYTES);
  const format = detectTableFormat(head);
  if (format === "parquet") return readParquetStream(stream, fileName, handler);
  if (format === "csv.gz") return readGzipCsv(stream, fileName, handler, textFormat);
  return readCsvStream(stream, fileName, handler, undefined, textFormat, firstRowIndex);
}

export function isLocalFile(source: TableSource): source is LocalFile {
  return !(source instanceof Readable) && "path" in source;
}

function isParquetPart(source: TableSource): source is ParquetPart {
  return !(source instanceof Readable) && "parquet" in source;
}

/** The format of a local file, from its first bytes. */
export async function detectLocalTableFormat(path: string): Promise<TableFormat> {
  return detectTableFormat(await readFileHead(path, SNIFFED_BYTES));
}

async function readLocalTable(
  file: LocalFile,
  fileName: string,
  handler: TableRowHandler,
  textFormat: CsvFormatChoice,
): Promise<number> {
  const format = await detectLocalTableFormat(file.path);
  if (format === "parquet") return readParquetFile(file.path, fileName, handler);
  const stream = createReadStream(file.path);
  return format === "csv.gz"
    ? readGzipCsv(stream, fileName, handler, textFormat)
    : readCsvStream(stream, fileName, handler, undefined, textFormat);
}

async function readFileHead(path: string, count: number): Promise<Uint8Array> {
  const handle = await open(path);
  try {
    const { buffer, bytesRead } = await handle.read(new Uint8Array(count), 0, count, 0);
    return buffer.subarray(0, bytesRead);
  } finally {
    await handle.close();
  }
}

/** Progress counts compressed bytes, so it compares with the file's size. */
function readGzipCsv(
  compressed: Readable,
  fileName: string,
  handler: TableRowHandler,
  textFormat: CsvFormatChoice,
): Promise<number> {
  const gunzip = createGunzip();
  const { onProgress, ...rows } = handler;
  if (onProgress) {
    let bytesRead = 0;
    compressed.on("data", (chunk: Buffer) => {
      bytesRead += chunk.length;
      onProgress(bytesRead);
    });
  }
  const text = compressed.pipe(gunzip);
  compressed.on("error", (error) => gunzip.destroy(error));
  // zlib's own messages ("incorrect header check", "unexpected end of file") say nothing of where.
  const decompressionError = new Promise<never>((_, reject) =>
    gunzip.on("error", (error) =>
      reject(
        error instanceof AnalysisInputError
          ? error
          : new AnalysisInputError(`the gzip data cannot be decompressed (${error.message})`, {
              file: fileName,
              expected: "a complete gzip-compressed CSV (.csv.gz)",
            }),
      ),
    ),
  );
  return Promise.race([
    readCsvStream(text, fileName, rows, undefined, textFormat),
    decompressionError,
  ]);
}

/**
 * The stream's first `count` bytes (fewer if it is shorter), and a stream of all of its bytes,
 * those included.
 */
async function peekStream(
  source: Readable,
  count: number,
): Promise<{ head: Uint8Array; stream: Readable }> {
  const chunks: AsyncIterator<Buffer | string> = source[Symbol.asyncIterator]();
  // A text stream (e.g. Readable.from of strings) is read as its UTF-8 bytes.
  const iterator = {
    next: async (): Promise<IteratorResult<Buffer>> => {
      const next = await chunks.next();
      return next.done || typeof next.value !== "string"
        ? (next as IteratorResult<Buffer>)
        : { done: false, value: Buffer.from(next.value, "utf8") };
    },
    return: () => chunks.return?.(),
  };
  const taken: Buffer[] = [];
  let length = 0;
  let done = false;
  do {
    const next = await iterator.next();
    if (next.done) done = true;
    else {
      taken.push(next.value);
      length += next.value.length;
    }
  } while (!done && length < count);
  const head = Buffer.concat(taken);
  async function* replay(): AsyncGenerator<Buffer> {
    try {
      if (head.length > 0) yield head;
      while (!done) {
        const next = await iterator.next();
        if (next.done) done = true;
        else yield next.value;
      }
    } finally {
      if (!done) await iterator.return?.();
    }
  }
  return { head, stream: Readable.from(replay(), { objectMode: false }) };
}
