// The shapes of a read (a module of its own so the readers in dataset-rows.ts and parallel-read.ts
// name them without importing read-dataset.ts, which imports them).
import type { ColumnAccumulator } from "./column-accumulator";
import type { MemorySettings } from "./memory-limit";
import type { PartitionMap } from "./partition-map";
import type { StoredMatrix } from "./stored-matrix";
import type { CsvFormat, CsvFormatChoice } from "./text-format";

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
   * Index in the whole file of the source's first data row, when the source is a part of a CSV
   * file read with its header (table-reader.ts `readTable`): rows are numbered as in the file.
   */
  firstRowIndex?: number;
  /**
   * The memory limit and scratch folder: values read beyond the limit's share go to a scratch file
   * (row-store.ts). Without settings everything stays in memory.
   */
  memory?: MemorySettings;
}
