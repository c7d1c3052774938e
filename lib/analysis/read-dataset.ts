import type { ColumnAccumulator } from "./column-accumulator";
import type { MemorySettings } from "./memory-limit";
import {
  completeDataset,
  DatasetRowCollector,
  findHeaderColumn,
  locateColumns,
  type DatasetColumnChoice,
} from "./dataset-rows";
import type { PartitionMap } from "./partition-map";
import { RowStore } from "./row-store";
import { readCsvInParallel } from "./parallel-read";
import type { StoredMatrix } from "./stored-matrix";
import { detectLocalTableFormat, isLocalFile, readTable, type TableSource } from "./table-reader";
import type { CsvFormat, CsvFormatChoice } from "./text-format";
import { trimToken } from "./tokens";

export type { DatasetColumnChoice } from "./dataset-rows";

/**
 * The dataset's kept rows, column by column, before encoding (methods.md §1). The feature values
 * are in memory unless the read was given memory settings (then they may be in a scratch file).
 */
export interface RawDataset<FeatureValues extends Float64Array | StoredMatrix = Float64Array> {
  fileName: string;
  /** Data rows in the file (header excluded). */
  totalRows: number;
  /** Rows kept: label present and assigned to a shard. */
  keptRows: number;
  droppedMissingLabel: number;
  droppedUnassigned: number;
  label: ColumnAccumulator;
  /** The label's number per kept row (NaN when it is not a number). */
  labelValues: Float64Array;
  features: ColumnAccumulator[];
  /**
   * Per kept row, the numbers of the feature columns in order (NaN where missing or not a number)
   * and one free slot (for the bias): keptRows × (features + 1), row-major, in a SharedArrayBuffer
   * — or in a scratch file when they outgrew the memory limit.
   */
  featureValues: FeatureValues;
  /** True when the user named the features (then an unusable one is an error, not a warning). */
  featuresNamed: boolean;
  /** The encoding, delimiter and decimal mark a text file was read with; null for Parquet. */
  format: CsvFormat | null;
  /** Per kept row, an index into `shardIds`. */
  shardCodes: Int32Array;
  /** Shard ids in first-appearance order (sorted later). */
  shardIds: string[];
}

export interface ReadDatasetOptions {
  partition: PartitionMap | null;
  dropUnassignedRows: boolean;
  /** Input bytes consumed so far (compressed bytes for gzip and Parquet). */
  onBytesRead?: (bytes: number) => void;
  /**
   * Threads that may share the reading: a local CSV with a shard column is then read in parts on
   * that many threads (parallel-read.ts), with the same result. Default 1.
   */
  threads?: number;
  /** The user's encoding, delimiter and decimal mark for a text file; what is not given is detected. */
  format?: CsvFormatChoice;
  /**
   * Columns whose trimmed text is handed over for every kept row, with the row's 0-based index
   * (the layout planner's row ids and groups). Whether they are also features is unchanged.
   */
  keptRowText?: {
    /** Each column's name and its role in messages ("group", …). */
    columns: { name: string; role: string }[];
    onRow: (values: string[], rowIndex: number) => void;
  };
  /**
   * The memory limit and scratch folder: values read beyond the limit's share go to a scratch file
   * (row-store.ts). Without settings everything stays in memory.
   */
  memory?: MemorySettings;
}

/**
 * Reads the dataset once (CSV, gzip CSV or Parquet: table-reader.ts), keeping only the columns in
 * use: rows with a missing label are dropped and counted, every other row is assigned to a shard
 * through the partition map (by the id column or by 0-based row index) or the shard column, and the
 * assignment is validated as methods.md §1 requires (unknown ids, ids used twice, unassigned rows).
 */
export async function readDataset(
  source: TableSource,
  fileName: string,
  columns: DatasetColumnChoice,
  options: ReadDatasetOptions & { memory?: undefined },
): Promise<RawDataset>;
export async function readDataset(
  source: TableSource,
  fileName: string,
  columns: DatasetColumnChoice,
  options: ReadDatasetOptions,
): Promise<RawDataset<Float64Array | StoredMatrix>>;
export async function readDataset(
  source: TableSource,
  fileName: string,
  columns: DatasetColumnChoice,
  {
    partition,
    dropUnassignedRows,
    onBytesRead,
    threads = 1,
    format: formatChoice = {},
    keptRowText,
    memory,
  }: ReadDatasetOptions,
): Promise<RawDataset<Float64Array | StoredMatrix>> {
  // Parts of a file are cut at line feeds, which only UTF-8 (or ASCII) text allows, and take the
  // delimiter and decimal mark found in its first lines.
  const detectedFormat =
    (formatChoice.encoding ?? "utf-8") === "utf-8" &&
    formatChoice.delimiter === undefined &&
    formatChoice.decimalMark === undefined;
  if (threads > 1 && partition === null && isLocalFile(source) && detectedFormat) {
    if ((await detectLocalTableFormat(source.path)) === "csv") {
      const read = await readCsvInParallel(source.path, fileName, columns, threads, {
        dropUnassignedRows,
        onBytesRead,
        memory,
      });
      if (read) return read;
    }
  }
  // Created in the header callback, once the columns are known (the cast keeps TypeScript from
  // narrowing them to null).
  let collector = null as DatasetRowCollector | null;
  let featureValues = null as RowStore | null;
  let format: CsvFormat | null = null;
  let keptRowTextIndices: number[] = [];
  try {
    return await readRows();
  } catch (error) {
    featureValues?.discard();
    throw error;
  }

  async function readRows(): Promise<RawDataset<Float64Array | StoredMatrix>> {
    const totalRows = await readTable(
      source,
      fileName,
      {
        onProgress: onBytesRead,
        onHeader(header, detected) {
          format = detected ?? null;
          const positions = locateColumns(header, fileName, columns);
          featureValues = new RowStore(positions.features.length + 1, { memory });
          collector = new DatasetRowCollector(
            header,
            fileName,
            positions,
            columns.idColumn,
            partition,
            featureValues,
            detected?.decimalMark,
          );
          keptRowTextIndices = (keptRowText?.columns ?? []).map(({ name, role }) =>
            findHeaderColumn(header, fileName, name, role),
          );
        },
        onRow(fields, rowIndex) {
          const rows = collector as DatasetRowCollector;
          const keptBefore = rows.keptRows;
          rows.addRow(fields, rowIndex);
          if (keptRowText && rows.keptRows > keptBefore) {
            keptRowText.onRow(
              keptRowTextIndices.map((index) => trimToken(fields[index])),
              rowIndex,
            );
          }
        },
      },
      formatChoice,
    );
    const rows = collector as DatasetRowCollector;
    return completeDataset(
      {
        fileName,
        totalRows,
        keptRows: rows.keptRows,
        droppedMissingLabel: rows.droppedMissingLabel,
        label: rows.label,
        labelValues: rows.labelValues.toArray(),
        features: rows.features,
        featureValues: (featureValues as RowStore).finish(),
        featuresNamed: columns.features !== undefined,
        format,
        shardCodes: rows.shardCodes.toArray(),
        shardIds: rows.shardIds,
      },
      { count: rows.unassignedCount, firstRows: rows.unassignedRows },
      columns,
      { partition, dropUnassignedRows },
    );
  }
}
