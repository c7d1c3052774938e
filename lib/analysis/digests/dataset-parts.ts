import { createReadStream } from "node:fs";
import { open, stat } from "node:fs/promises";
import { addAbortSignal, Readable } from "node:stream";
import { countRows } from "../count-rows";
import { AnalysisInputError } from "../errors";
import type { MemorySettings } from "../memory-limit";
import { cutSourceIntoParts, type ByteSource } from "../parallel-read";
import type { DatasetColumnChoice, RawDataset } from "../read-dataset";
import type { StoredMatrix } from "../stored-matrix";
import { detectTableFormat } from "../table-reader";
import { readClientRows } from "./client-rows";

/**
 * One part of a dataset file: bytes [start, end) of whole lines. A part starting at 0 is the file
 * from its beginning, header included; any other is read after the header's bytes.
 */
export interface DatasetPart {
  start: number;
  end: number;
}

/** How a dataset file is split for several workers. */
export interface DatasetPartPlan {
  /** Bytes of the header line (with its line end), read before every part. */
  headerBytes: number;
  parts: DatasetPart[];
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
 * Cuts a CSV into up to `count` parts at line ends, for one analysis shared by several workers. A
 * file that cannot be cut safely — gzip or Parquet (a Parquet file's row groups would serve, but
 * they are not cut here), quoted fields (which may hold line breaks), a header past its first
 * 64 KB — is one part: the whole file.
 */
export async function planDatasetParts(
  bytes: DatasetBytes,
  fileName: string,
  count: number,
): Promise<DatasetPartPlan> {
  const layout =
    count > 1 && detectTableFormat(await bytes.read(0, SNIFFED_BYTES)) === "csv"
      ? await cutSourceIntoParts(bytes, fileName, count)
      : null;
  if (layout === null) return { headerBytes: 0, parts: [{ start: 0, end: bytes.size }] };
  return { headerBytes: layout.headerBytes, parts: layout.parts };
}

/** The text of one part as a stream: the header's bytes, then the part's lines. */
export function openDatasetPart(
  bytes: DatasetBytes,
  plan: DatasetPartPlan,
  part: DatasetPart,
): Readable {
  if (part.start === 0) return bytes.stream(0, part.end);
  return Readable.from(
    (async function* () {
      yield* bytes.stream(0, plan.headerBytes);
      yield* bytes.stream(part.start, part.end);
    })(),
  );
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
  const data = openDatasetPart(bytes, plan, plan.parts[index]);
  return readClientRows({
    data: signal ? addAbortSignal(signal, data) : data,
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
  if (part.start <= plan.headerBytes) return 0;
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
  try {
    return await attempt(0);
  } catch (error) {
    if (!(error instanceof AnalysisInputError)) throw error;
    const firstRowIndex = await countRowsBefore(bytes, plan, part);
    if (firstRowIndex === 0) throw error;
    return await attempt(firstRowIndex);
  }
}
