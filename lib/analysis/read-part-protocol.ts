import type { ColumnSnapshot } from "./column-accumulator";
import type { ColumnPositions } from "./dataset-rows";
import type { InputProblemLocation } from "./errors";
import type { DecimalMark } from "./text-format";

/** What a part-reading thread is started with (workerData). */
export interface ReadPartData {
  path: string;
  /** Bytes [start, end) of the file: whole lines, after the header. */
  start: number;
  end: number;
  fileName: string;
  header: string[];
  delimiter: string;
  /** The decimal mark found in the file's first lines (methods.md §1), the same for every part. */
  decimalMark: DecimalMark;
  positions: ColumnPositions;
  idColumn: string | undefined;
}

/** Sent to the thread once every part has counted its rows. */
export interface ReadPartOrder {
  /** Holds every data row of the file, row-major, `positions.features.length + 1` wide. */
  values: Float64Array;
  /** Index of the part's first data row in the file; its rows go from there in `values`. */
  firstRowIndex: number;
}

/** What the thread posts: its row count, then the rows it kept, or why it could not. */
export type ReadPartReport =
  | { type: "counted"; rows: number; quoted: boolean }
  | { type: "progress"; bytes: number }
  | {
      type: "read";
      rows: number;
      keptRows: number;
      droppedMissingLabel: number;
      unassignedCount: number;
      unassignedRows: number[];
      label: ColumnSnapshot;
      features: ColumnSnapshot[];
      labelValues: Float64Array;
      shardCodes: Int32Array;
      shardIds: string[];
    }
  /** The rows did not split as counted (e.g. bare carriage returns as line ends): read serially. */
  | { type: "miscounted" }
  | { type: "input-error"; problem: string; location: InputProblemLocation }
  | { type: "failed"; detail: string };
