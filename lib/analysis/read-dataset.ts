import { ChunkedFloat64, ChunkedInt32 } from "./chunked-arrays";
import { ColumnAccumulator, MAX_ONE_HOT_LEVELS } from "./column-accumulator";
import { AnalysisInputError, listFirst } from "./errors";
import type { PartitionMap } from "./partition-map";
import { RowStore } from "./row-store";
import { isMissingToken, trimToken } from "./tokens";
import { readTable, type TableSource } from "./table-reader";

export interface DatasetColumnChoice {
  labelColumn: string;
  idColumn?: string;
  shardColumn?: string;
  /** Feature columns; default all but the label, id and shard columns. */
  features?: string[];
}

/** The dataset's kept rows, column by column, before encoding (methods.md §1). */
export interface RawDataset {
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
   * and one free slot (for the bias): keptRows × (features + 1), row-major, in a SharedArrayBuffer.
   */
  featureValues: Float64Array;
  /** True when the user named the features (then an unusable one is an error, not a warning). */
  featuresNamed: boolean;
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
}

const LISTED_OFFENDERS = 5;

/**
 * Reads the dataset once (CSV, gzip CSV or Parquet: table-reader.ts), keeping only the columns in use: rows with a missing label are
 * dropped and counted, every other row is assigned to a shard through the partition map (by the id
 * column or by 0-based row index) or the shard column, and the assignment is validated as
 * methods.md §1 requires (unknown ids, ids used twice, unassigned rows).
 */
export async function readDataset(
  source: TableSource,
  fileName: string,
  columns: DatasetColumnChoice,
  { partition, dropUnassignedRows, onBytesRead }: ReadDatasetOptions,
): Promise<RawDataset> {
  let labelIndex = -1;
  let idIndex = -1;
  let shardIndex = -1;
  let featureIndices: number[] = [];
  // Assigned in the header callback; the cast keeps TypeScript from narrowing it to null.
  let label = null as ColumnAccumulator | null;
  let features: ColumnAccumulator[] = [];
  // Created in the header callback, once the number of features is known (same cast as above).
  let featureValues = null as RowStore | null;
  const labelValues = new ChunkedFloat64();
  const shardCodes = new ChunkedInt32();
  const shardIds: string[] = partition ? partition.shardIds : [];
  const shardCodeOfId = new Map<string, number>();
  const unassignedRows: number[] = [];
  let unassignedCount = 0;
  let droppedMissingLabel = 0;
  let keptRows = 0;

  const totalRows = await readTable(source, fileName, {
    onProgress: onBytesRead,
    onHeader(header) {
      const findColumn = (name: string, role: string) => {
        const index = header.indexOf(name);
        if (index < 0) {
          throw new AnalysisInputError(`there is no ${role} column "${name}"`, {
            file: fileName,
            column: name,
            expected: `one of the header's columns: ${listFirst(header, header.length, 12)}`,
          });
        }
        return index;
      };
      labelIndex = findColumn(columns.labelColumn, "label");
      idIndex = columns.idColumn ? findColumn(columns.idColumn, "id") : -1;
      shardIndex = columns.shardColumn ? findColumn(columns.shardColumn, "shard") : -1;
      const reserved = new Set([labelIndex, idIndex, shardIndex]);
      if (columns.features) {
        featureIndices = columns.features.map((name) => {
          const index = findColumn(name, "feature");
          if (reserved.has(index)) {
            throw new AnalysisInputError("a feature cannot also be the label, id or shard column", {
              file: fileName,
              column: name,
              expected: "features other than the label, id and shard columns",
            });
          }
          return index;
        });
      } else {
        featureIndices = header.map((_, index) => index).filter((index) => !reserved.has(index));
      }
      label = new ColumnAccumulator(header[labelIndex], fileName, Infinity);
      features = featureIndices.map(
        (index) => new ColumnAccumulator(header[index], fileName, MAX_ONE_HOT_LEVELS),
      );
      featureValues = new RowStore(features.length + 1);
    },
    onRow(fields, rowIndex) {
      let shardCode: number;
      if (partition) {
        const rowId = idIndex >= 0 ? trimToken(fields[idIndex]) : String(rowIndex);
        shardCode = partition.lookUp(rowId);
        if (shardCode === -2) {
          throw new AnalysisInputError(`the id "${rowId}" appears on more than one data row`, {
            file: fileName,
            row: rowIndex,
            column: columns.idColumn,
            expected: "unique ids, so each row is assigned exactly once",
          });
        }
      } else {
        const shard = trimToken(fields[shardIndex]);
        if (isMissingToken(shard)) {
          shardCode = -1;
        } else {
          const known = shardCodeOfId.get(shard);
          shardCode = known ?? shardIds.length;
          if (known === undefined) {
            shardIds.push(shard);
            shardCodeOfId.set(shard, shardCode);
          }
        }
      }
      if (isMissingToken(trimToken(fields[labelIndex]))) {
        droppedMissingLabel++;
        return;
      }
      if (shardCode < 0) {
        unassignedCount++;
        if (unassignedRows.length < LISTED_OFFENDERS) unassignedRows.push(rowIndex);
        return;
      }
      labelValues.push((label as ColumnAccumulator).add(fields[labelIndex], rowIndex));
      const store = featureValues as RowStore;
      const offset = store.appendRow();
      const values = store.values;
      for (let k = 0; k < featureIndices.length; k++) {
        values[offset + k] = features[k].add(fields[featureIndices[k]], rowIndex);
      }
      shardCodes.push(shardCode);
      keptRows++;
    },
  });

  const problems: string[] = [];
  if (unassignedCount > 0 && !dropUnassignedRows) {
    problems.push(
      `${unassignedCount} data rows with a label have no shard (rows ${listFirst(unassignedRows, unassignedCount)})`,
    );
  }
  if (partition) {
    const unknown = partition.findUnmatched();
    if (unknown.length > 0) {
      problems.push(
        `${unknown.length} row ids in the partition map match no data row (${listFirst(unknown, unknown.length)})`,
      );
    }
  }
  if (problems.length > 0) {
    throw new AnalysisInputError(problems.join("; "), {
      file: partition ? partition.fileName : fileName,
      column: partition ? "row_id" : columns.shardColumn,
      expected: "every labelled data row assigned to exactly one shard",
    });
  }
  if (keptRows === 0) {
    throw new AnalysisInputError(
      totalRows === 0 ? "the file has a header but no data rows" : "every data row lacks a label",
      { file: fileName, column: columns.labelColumn, expected: "at least one row with a label" },
    );
  }

  return {
    fileName,
    totalRows,
    keptRows,
    droppedMissingLabel,
    droppedUnassigned: dropUnassignedRows ? unassignedCount : 0,
    label: label as ColumnAccumulator,
    labelValues: labelValues.toArray(),
    features,
    featureValues: (featureValues as RowStore).finish(),
    featuresNamed: columns.features !== undefined,
    shardCodes: shardCodes.toArray(),
    shardIds,
  };
}
