import { createWriteStream } from "node:fs";
import { mkdtemp, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import type { Readable } from "node:stream";
import { pipeline } from "node:stream/promises";
import {
  asyncBufferFromFile,
  parquetMetadataAsync,
  parquetRead,
  parquetSchema,
  type AsyncBuffer,
  type FileMetaData,
  type SchemaTree,
} from "hyparquet";
import { compressors } from "hyparquet-compressors";
import type { CsvRowHandler } from "./csv-reader";
import { readHeader } from "./csv-reader";
import { AnalysisInputError } from "./errors";

export type { AsyncBuffer } from "hyparquet";

/**
 * A Parquet file's column names (top-level fields) and row groups, read from its footer. A file
 * that is not Parquet, or is cut short, is an AnalysisInputError naming it.
 */
export interface ParquetLayout {
  metadata: FileMetaData;
  columns: string[];
  /** Per column, whether the schema stores numbers (integers, floats, decimals; not dates). */
  numeric: boolean[];
  /** First row of each row group, and the total row count last (rowGroups + 1 entries). */
  groupStarts: number[];
  /** Compressed bytes of each row group, for progress. */
  groupBytes: number[];
  /** Where each row group's bytes begin in the file (its first column chunk's first page). */
  groupOffsets: number[];
}

export async function readParquetLayout(
  file: AsyncBuffer,
  fileName: string,
): Promise<ParquetLayout> {
  let metadata: FileMetaData;
  try {
    metadata = await parquetMetadataAsync(file);
  } catch (error) {
    throw new AnalysisInputError(
      `the Parquet footer cannot be read (${error instanceof Error ? error.message : "unknown problem"})`,
      { file: fileName, expected: "a complete Parquet file" },
    );
  }
  const fields = parquetSchema(metadata).children;
  const columns = readHeader(
    fields.map((child: SchemaTree) => child.element.name),
    fileName,
  );
  const numeric = fields.map((child: SchemaTree) => isNumericElement(child));
  const groupStarts = [0];
  const groupBytes: number[] = [];
  const groupOffsets: number[] = [];
  for (const group of metadata.row_groups) {
    groupOffsets.push(
      Math.min(
        ...group.columns.map((chunk) =>
          Number(chunk.meta_data?.dictionary_page_offset ?? chunk.meta_data?.data_page_offset ?? 0),
        ),
      ),
    );
    groupStarts.push(groupStarts[groupStarts.length - 1] + Number(group.num_rows));
    groupBytes.push(
      Number(
        group.total_compressed_size ??
          group.columns.reduce(
            (sum, chunk) => sum + (chunk.meta_data?.total_compressed_size ?? 0n),
            0n,
          ),
      ),
    );
  }
  return { metadata, columns, numeric, groupStarts, groupBytes, groupOffsets };
}

/**
 * Up to `count` parts of whole row groups, about equal in compressed bytes, as byte ranges of the
 * file: a part is the row groups that begin in [start, end). Null when the file cannot be cut so —
 * one row group, or row groups not laid out in file order.
 */
export function cutParquetIntoParts(
  layout: ParquetLayout,
  fileSize: number,
  count: number,
): { start: number; end: number }[] | null {
  const offsets = layout.groupOffsets;
  if (
    offsets.length < 2 ||
    offsets.some((offset, group) => group > 0 && offset <= offsets[group - 1])
  ) {
    return null;
  }
  const total = layout.groupBytes.reduce((sum, bytes) => sum + bytes, 0);
  const firstGroups = [0];
  let before = 0;
  for (let group = 0; group + 1 < offsets.length; group++) {
    before += layout.groupBytes[group];
    const part = firstGroups.length;
    if (part < count && before >= (total * part) / count) firstGroups.push(group + 1);
  }
  return firstGroups.map((group, part) => ({
    start: part === 0 ? 0 : offsets[group],
    end: part + 1 < firstGroups.length ? offsets[firstGroups[part + 1]] : fileSize,
  }));
}

/** The row groups [from, to) that begin in bytes [start, end) of the file. */
export function findGroupsIn(
  layout: ParquetLayout,
  start: number,
  end: number,
): { from: number; to: number } {
  const inRange = layout.groupOffsets.flatMap((offset, group) =>
    offset >= start && offset < end ? [group] : [],
  );
  return inRange.length === 0
    ? { from: 0, to: 0 }
    : { from: inRange[0], to: inRange[inRange.length - 1] + 1 };
}

const NUMERIC_TYPES = new Set(["INT32", "INT64", "FLOAT", "DOUBLE"]);
const NUMERIC_ANNOTATIONS = new Set([
  undefined,
  "DECIMAL",
  "INT_8",
  "INT_16",
  "INT_32",
  "INT_64",
  "UINT_8",
  "UINT_16",
  "UINT_32",
  "UINT_64",
]);

function isNumericElement({ element, children }: SchemaTree): boolean {
  return (
    children.length === 0 &&
    element.type !== undefined &&
    NUMERIC_TYPES.has(element.type) &&
    NUMERIC_ANNOTATIONS.has(element.converted_type) &&
    (element.logical_type === undefined ||
      element.logical_type.type === "INTEGER" ||
      element.logical_type.type === "DECIMAL")
  );
}

/** The first rows of a Parquet file as text fields, reading only the pages they lie in when it can. */
export async function readParquetHead(
  file: AsyncBuffer,
  layout: ParquetLayout,
  fileName: string,
  maxRows: number,
): Promise<string[][]> {
  const totalRows = layout.groupStarts[layout.groupStarts.length - 1];
  const rowEnd = Math.min(maxRows, totalRows);
  if (rowEnd === 0) return [];
  const columns = await readGroupColumns(file, layout, 0, rowEnd, fileName, true);
  return Array.from({ length: rowEnd }, (_, row) =>
    columns.map(({ data, dataStart }) => toField(data[row - dataStart])),
  );
}

/**
 * The rows of one row group range [groupFrom, groupTo) as CSV-like text fields, one row group in
 * memory at a time (column by column, as Parquet stores it).
 */
export async function readParquetRowGroups(
  file: AsyncBuffer,
  layout: ParquetLayout,
  fileName: string,
  handler: Pick<CsvRowHandler, "onRow" | "onProgress">,
  groupFrom = 0,
  groupTo = layout.groupStarts.length - 1,
): Promise<void> {
  const width = layout.columns.length;
  const fields = new Array<string>(width);
  let bytesRead = 0;
  for (let group = groupFrom; group < groupTo; group++) {
    const start = layout.groupStarts[group];
    const end = layout.groupStarts[group + 1];
    const columns = await readGroupColumns(file, layout, start, end, fileName);
    for (let row = start; row < end; row++) {
      for (let column = 0; column < width; column++) {
        const { data, dataStart } = columns[column];
        fields[column] = toField(data[row - dataStart]);
      }
      handler.onRow(fields, row);
    }
    bytesRead += layout.groupBytes[group];
    handler.onProgress?.(bytesRead);
  }
}

/** Reads a whole Parquet file like a CSV: header, then every row in order. Resolves with the row count. */
export async function readParquetFile(
  path: string,
  fileName: string,
  handler: CsvRowHandler,
): Promise<number> {
  const file = await asyncBufferFromFile(path);
  const layout = await readParquetLayout(file, fileName);
  handler.onHeader(layout.columns);
  await readParquetRowGroups(file, layout, fileName, handler);
  return layout.groupStarts[layout.groupStarts.length - 1];
}

/**
 * A part of a Parquet file read where it lies (by byte ranges: in storage, say): the row groups
 * that begin in bytes [start, end) (see `cutParquetIntoParts`).
 */
export interface ParquetPart {
  parquet: AsyncBuffer;
  start: number;
  end: number;
}

/**
 * Reads a part of a Parquet file like a CSV: the header, then the part's rows, numbered as in the
 * whole file. Resolves with the part's row count.
 */
export async function readParquetPart(
  part: ParquetPart,
  fileName: string,
  handler: CsvRowHandler,
): Promise<number> {
  const layout = await readParquetLayout(part.parquet, fileName);
  handler.onHeader(layout.columns);
  const { from, to } = findGroupsIn(layout, part.start, part.end);
  await readParquetRowGroups(part.parquet, layout, fileName, handler, from, to);
  return layout.groupStarts[to] - layout.groupStarts[from];
}

/**
 * Parquet keeps its index in a footer at the end, so a streamed file (an upload, an S3 object) is
 * first written to a temporary file, read from there and removed.
 */
export async function readParquetStream(
  stream: Readable,
  fileName: string,
  handler: CsvRowHandler,
): Promise<number> {
  const folder = await mkdtemp(join(tmpdir(), "partita-parquet-"));
  try {
    const path = join(folder, "table.parquet");
    await pipeline(stream, createWriteStream(path));
    return await readParquetFile(path, fileName, handler);
  } finally {
    await rm(folder, { recursive: true, force: true });
  }
}

/** One column's values over a row range: `data[row - dataStart]`. */
interface ColumnSpan {
  data: ArrayLike<unknown>;
  dataStart: number;
}

async function readGroupColumns(
  file: AsyncBuffer,
  layout: ParquetLayout,
  rowStart: number,
  rowEnd: number,
  fileName: string,
  usePageIndex = false,
): Promise<ColumnSpan[]> {
  const columnIndex = new Map(layout.columns.map((name, index) => [name, index]));
  const chunks: ColumnSpan[][] = layout.columns.map(() => []);
  try {
    await parquetRead({
      file,
      metadata: layout.metadata,
      rowStart,
      rowEnd,
      compressors,
      useOffsetIndex: usePageIndex,
      onChunk({ columnName, columnData, rowStart: dataStart }) {
        chunks[columnIndex.get(columnName) as number].push({ data: columnData, dataStart });
      },
    });
  } catch (error) {
    if (error instanceof AnalysisInputError) throw error;
    throw new AnalysisInputError(
      `rows ${rowStart}–${rowEnd - 1} cannot be decoded (${error instanceof Error ? error.message : "unknown problem"})`,
      { file: fileName, expected: "a Parquet file of flat columns with a supported compression" },
    );
  }
  // A column chunk usually arrives whole and is used as it is; pieces are joined.
  return chunks.map((pieces) =>
    pieces.length === 1 ? pieces[0] : joinPieces(pieces, rowStart, rowEnd),
  );
}

function joinPieces(pieces: ColumnSpan[], rowStart: number, rowEnd: number): ColumnSpan {
  const data = new Array<unknown>(rowEnd - rowStart).fill(null);
  for (const { data: piece, dataStart } of pieces) {
    const from = Math.max(dataStart, rowStart);
    const to = Math.min(dataStart + piece.length, rowEnd);
    for (let row = from; row < to; row++) data[row - rowStart] = piece[row - dataStart];
  }
  return { data, dataStart: rowStart };
}

/**
 * The text a CSV of the same table holds for a Parquet value: missing (null) is empty, a number is
 * its shortest round-trip decimal (so it parses back to the same double), a date its ISO form,
 * anything nested its JSON.
 */
export function toField(value: unknown): string {
  if (value === null || value === undefined) return "";
  if (typeof value === "string") return value;
  if (typeof value === "number" || typeof value === "bigint" || typeof value === "boolean") {
    return String(value);
  }
  if (value instanceof Date) return value.toISOString();
  return JSON.stringify(value, (_, inner: unknown) =>
    typeof inner === "bigint" ? String(inner) : inner,
  );
}
