import { createReadStream } from "node:fs";
import { open, stat } from "node:fs/promises";
import { Readable } from "node:stream";
import { cutSourceIntoParts, type ByteSource } from "../parallel-read";
import type { DatasetColumnChoice, RawDataset } from "../read-dataset";
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
 * One part's rows, read with the engine's reader as a client's are (methods.md §1); its data row
 * indices count from the part's first line. The shard comes from a shard column (a partition map by
 * row index would need the rows before the part).
 */
export async function readDatasetPart(
  bytes: DatasetBytes,
  fileName: string,
  plan: DatasetPartPlan,
  index: number,
  columns: DatasetColumnChoice & { shardColumn: string },
): Promise<RawDataset> {
  return readClientRows({
    data: openDatasetPart(bytes, plan, plan.parts[index]),
    dataName:
      plan.parts.length === 1
        ? fileName
        : `${fileName} (part ${index + 1} of ${plan.parts.length})`,
    columns,
  });
}
