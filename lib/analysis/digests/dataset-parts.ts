import { createReadStream } from "node:fs";
import { stat } from "node:fs/promises";
import { Readable } from "node:stream";
import { cutIntoParts } from "../parallel-read";
import type { DatasetColumnChoice, RawDataset } from "../read-dataset";
import { detectLocalTableFormat } from "../table-reader";
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

/**
 * Cuts a local CSV into up to `count` parts at line ends, for one analysis shared by several
 * workers. A file that cannot be cut safely — gzip or Parquet, quoted fields (which may hold line
 * breaks), a header past its first 64 KB — is one part: the whole file.
 */
export async function planDatasetParts(
  path: string,
  fileName: string,
  count: number,
): Promise<DatasetPartPlan> {
  const { size } = await stat(path);
  const layout =
    count > 1 && (await detectLocalTableFormat(path)) === "csv"
      ? await cutIntoParts(path, fileName, count)
      : null;
  if (layout === null) return { headerBytes: 0, parts: [{ start: 0, end: size }] };
  return { headerBytes: layout.headerBytes, parts: layout.parts };
}

/** The text of one part as a stream: the header's bytes, then the part's lines. */
export function openDatasetPart(path: string, plan: DatasetPartPlan, part: DatasetPart): Readable {
  if (part.start === 0) return createReadStream(path, { end: part.end - 1 });
  const header = createReadStream(path, { start: 0, end: plan.headerBytes - 1 });
  const lines = createReadStream(path, { start: part.start, end: part.end - 1 });
  return Readable.from(
    (async function* () {
      yield* header;
      yield* lines;
    })(),
  );
}

/**
 * One part's rows, read with the engine's reader as a client's are (methods.md §1); its data row
 * indices count from the part's first line. The shard comes from a shard column (a partition map by
 * row index would need the rows before the part).
 */
export async function readDatasetPart(
  path: string,
  fileName: string,
  plan: DatasetPartPlan,
  index: number,
  columns: DatasetColumnChoice & { shardColumn: string },
): Promise<RawDataset> {
  return readClientRows({
    data: openDatasetPart(path, plan, plan.parts[index]),
    dataName:
      plan.parts.length === 1
        ? fileName
        : `${fileName} (part ${index + 1} of ${plan.parts.length})`,
    columns,
  });
}
