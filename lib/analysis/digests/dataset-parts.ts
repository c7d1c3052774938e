import { createReadStream } from "node:fs";
import { open, stat } from "node:fs/promises";
import { addAbortSignal, Readable } from "node:stream";
import { countRows } from "../count-rows";
import { AnalysisInputError } from "../errors";
import type { MemorySettings } from "../memory-limit";
import { cutSourceIntoParts, type ByteSource } from "../parallel-read";
import type { DatasetColumnChoice, RawDataset } from "../read-dataset";
import type { StoredMatrix } from "../stored-matrix";
import { cutParquetIntoParts, readParquetLayout, type AsyncBuffer } from "../parquet-reader";
import { detectTableFormat, type TableFormat, type TableSource } from "../table-reader";
import { readClientRows } from "./client-rows";

/**
 * One part of a dataset file: bytes [start, end) of whole lines of a CSV, or of whole row groups
 * of a Parquet file (those that begin in the range). A CSV part starting at 0 is the file from its
 * beginning, header included; any other is read after the header's bytes.
 */
export interface DatasetPart {
  start: number;
  end: number;
}

/** How a dataset file is split for several workers. */
export interface DatasetPartPlan {
  /** The file's format, from its first bytes: how its parts are read. */
  format: TableFormat;
  /** Bytes of a CSV's header line (with its line end), read before every part; 0 for Parquet. */
  headerBytes: number;
  parts: DatasetPart[];
  /** Why the file is one part though several were asked for, in words for the report. */
  wholeBecause?: string;
}

/** A dataset's bytes, read by ranges: a local file, or an object in storage. */
export interface DatasetBytes extends ByteSource {
  /** Bytes [start, end) as a stream. */
  stream(start: number, end: number): Readable;
}

/** A local file as DatasetBytes. */
export async function localDatasetBytes(path: string): Promise<DatasetBytes> {
  const { size } = await stat(path);
  return {
    size,
    async read(position, length) {
      const file = await open(path);
      try {
        const buffer = Buffer.alloc(length);
        const { bytesRead } = await file.read(buffer, 0, length, position);
        return buffer.subarray(0, bytesRead);
      } finally {
        await file.close();
      }
    },
    stream: (start, end) => createReadStream(path, { start, end: end - 1 }),
  };
}

/** Bytes that tell CSV from gzip and Parquet (their magic numbers). */
const SNIFFED_BYTES = 16;

/**
 * Cuts a dataset into up to `count` parts, for one analysis shared by several workers: a CSV at
 * line ends, a Parquet file by whole row groups (read from its footer). A file that cannot be cut
 * safely — gzip (a compressed stream has no places to start reading but its beginning), a Parquet
 * file of one row group, a CSV with quoted fields (which may hold line breaks) or a header past its
 * first 64 KB, a file whose footer or header cannot be read — is one part: the whole file.
 */
export async function planDatasetParts(
  bytes: DatasetBytes,
  fileName: string,
  count: number,
): Promise<DatasetPartPlan> {
  const format = detectTableFormat(await bytes.read(0, SNIFFED_BYTES));
  const whole = (wholeBecause?: string): DatasetPartPlan => ({
    format,
    headerBytes: 0,
    parts: [{ start: 0, end: bytes.size }],
    wholeBecause,
  });
  if (count < 2) return whole();
  if (format === "csv.gz") {
    return whole(
      "the file is gzip-compressed, and compressed data can only be read from its start",
    );
  }
  if (format === "parquet") {
    // A footer that cannot be read is the one-process read's error to report.
    const layout = await readParquetLayout(readByRanges(bytes), fileName).catch(() => null);
    if (layout === null) return whole("the Parquet file's footer cannot be read");
    const parts = cutParquetIntoParts(layout, bytes.size, count);
    if (parts) return { format, headerBytes: 0, parts };
    return whole(
      layout.groupOffsets.length < 2
        ? "the Parquet file has one row group, and a Parquet file is cut between row groups"
        : "the Parquet file's row groups are not stored in row order",
    );
  }
  const layout = await cutSourceIntoParts(bytes, fileName, count);
  if (layout === null) {
    return whole(
      "the CSV has quoted fields (a quoted field may hold a line break, so a line end may not end a row) or a header longer than 64 KB",
    );
  }
  return { format, headerBytes: layout.headerBytes, parts: layout.parts };
}

/**
 * The plan of one part as its worker knows it (the part's record: its range and the header's
 * bytes), the format read from the file's first bytes.
 */
export async function planOnePart(
  bytes: DatasetBytes,
  part: DatasetPart & { headerBytes: number },
): Promise<DatasetPartPlan> {
  return {
    format: detectTableFormat(await bytes.read(0, SNIFFED_BYTES)),
    headerBytes: part.headerBytes,
    parts: [{ start: part.start, end: part.end }],
  };
}

/**
 * One part as a table to read: a CSV part's text as a stream (the header's bytes, then the part's
 * lines), a Parquet part as its row groups read by byte ranges. Stopped by `signal`, the read
 * ends at its next chunk or range.
 */
export function openDatasetPart(
  bytes: DatasetBytes,
  plan: DatasetPartPlan,
  part: DatasetPart,
  signal?: AbortSignal,
): TableSource {
  if (plan.format === "parquet") {
    return { parquet: readByRanges(bytes, signal), start: part.start, end: part.end };
  }
  const text =
    part.start === 0
      ? bytes.stream(0, part.end)
      : Readable.from(
          (async function* () {
            yield* bytes.stream(0, plan.headerBytes);
            yield* bytes.stream(part.start, part.end);
          })(),
        );
  return signal ? addAbortSignal(signal, text) : text;
}

/** The file as Parquet's reader reads it: by byte ranges, fetched as asked for (none kept). */
function readByRanges(bytes: DatasetBytes, signal?: AbortSignal): AsyncBuffer {
  return {
    byteLength: bytes.size,
    async slice(start, end = bytes.size) {
      signal?.throwIfAborted();
      const read = await bytes.read(start, end - start);
      return read.buffer.slice(read.byteOffset, read.byteOffset + read.byteLength) as ArrayBuffer;
    },
  };
}

/**
 * One part's rows, read with the engine's reader as a client's are (methods.md §1), named by the
 * file's name; its data rows are numbered from `firstRowIndex` (by default from the part's first
 * line: see `withFileRowNumbers`); with memory settings, values beyond the limit's share go to a
 * scratch file (the caller closes it, or the client reading the rows does). The shard comes from a shard column (a partition map by row
 * index would need the rows before the part). A stream stopped by `signal` ends the read.
 */
export async function readDatasetPart(
  bytes: DatasetBytes,
  fileName: string,
  plan: DatasetPartPlan,
  index: number,
  columns: DatasetColumnChoice,
  {
    signal,
    firstRowIndex = 0,
    memory,
  }: { signal?: AbortSignal; firstRowIndex?: number; memory?: MemorySettings } = {},
): Promise<RawDataset<Float64Array | StoredMatrix>> {
  return readClientRows({
    data: openDatasetPart(bytes, plan, plan.parts[index], signal),
    dataName: fileName,
    columns,
    firstRowIndex,
    memory,
  });
}

/**
 * The data rows of the file before the part, as the reader counts them (lines that are not empty):
 * a read of every byte before the part, without parsing.
 */
export async function countRowsBefore(
  bytes: DatasetBytes,
  plan: DatasetPartPlan,
  part: DatasetPart,
): Promise<number> {
  if (plan.format === "parquet" || part.start <= plan.headerBytes) return 0;
  return (await countRows(bytes.stream(plan.headerBytes, part.start))).rows;
}

/**
 * Runs `attempt` — a read of the part and what is computed from its rows — numbering rows from the
 * part's first line; when it fails on bad input, runs it again numbering rows as in the whole file,
 * so that the message names the row (and rows) a one-process read of the file names. Counting the
 * rows before the part reads every byte before it: only a failure pays for it.
 */
export async function withFileRowNumbers<T>(
  bytes: DatasetBytes,
  plan: DatasetPartPlan,
  part: DatasetPart,
  attempt: (firstRowIndex: number) => Promise<T>,
): Promise<T> {
  // Parquet's reader numbers a part's rows from the file's row groups already.
  if (plan.format === "parquet") return attempt(0);
  try {
    return await attempt(0);
  } catch (error) {
    if (!(error instanceof AnalysisInputError)) throw error;
    const firstRowIndex = await countRowsBefore(bytes, plan, part);
    if (firstRowIndex === 0) throw error;
    return await attempt(firstRowIndex);
  }
}
