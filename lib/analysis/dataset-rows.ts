import { ChunkedFloat64, ChunkedInt32 } from "./chunked-arrays";
import { ColumnAccumulator, MAX_ONE_HOT_LEVELS } from "./column-accumulator";
import { quoteValue } from "./quote-value";
import type { DecimalMark } from "./text-format";
import { AnalysisInputError, listFirst } from "./errors";
import type { PartitionMap } from "./partition-map";
import type { RawDataset } from "./raw-dataset";
import type { StoredMatrix } from "./stored-matrix";
import { isMissingToken, trimToken } from "./tokens";

export interface DatasetColumnChoice {
  labelColumn: string;
  idColumn?: string;
  shardColumn?: string;
  /** Feature columns; default all but the label, id and shard columns. */
  features?: string[];
}

/** Where each column in use sits in the header. */
export interface ColumnPositions {
  label: number;
  /** -1 without an id column. */
  id: number;
  /** -1 without a shard column. */
  shard: number;
  features: number[];
}

/** Rows that go into the feature values, one at a time (offset of the row's first value). */
export interface RowSink {
  values: Float64Array;
  appendRow(): number;
}

/** Unassigned rows listed in messages. */
export const LISTED_OFFENDERS = 5;

/** Position of a column in the header; a missing one is an error naming its role ("label", …). */
export function findHeaderColumn(
  header: string[],
  fileName: string,
  name: string,
  role: string,
): number {
  const index = header.indexOf(name);
  if (index < 0) {
    throw new AnalysisInputError(`there is no ${role} column ${quoteValue(name)}`, {
      file: fileName,
      column: name,
      expected: `one of the header's columns: ${listFirst(header, header.length, 12)}`,
    });
  }
  return index;
}

/** Finds the label, id, shard and feature columns in the header (methods.md §1 defaults). */
export function locateColumns(
  header: string[],
  fileName: string,
  columns: DatasetColumnChoice,
): ColumnPositions {
  const findColumn = (name: string, role: string) => findHeaderColumn(header, fileName, name, role);
  const label = findColumn(columns.labelColumn, "label");
  const id = columns.idColumn ? findColumn(columns.idColumn, "id") : -1;
  const shard = columns.shardColumn ? findColumn(columns.shardColumn, "shard") : -1;
  const reserved = new Set([label, id, shard]);
  let features: number[];
  if (columns.features) {
    features = columns.features.map((name) => {
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
    features = header.map((_, index) => index).filter((index) => !reserved.has(index));
  }
  return { label, id, shard, features };
}

/**
 * Takes the dataset's rows as they are read: drops and counts rows with a missing label, assigns
 * every other row to a shard (partition map by id or row index, or the shard column), and follows
 * the label and feature columns, writing each kept row's feature numbers to the sink.
 */
export class DatasetRowCollector {
  readonly label: ColumnAccumulator;
  readonly features: ColumnAccumulator[];
  readonly labelValues = new ChunkedFloat64();
  readonly shardCodes = new ChunkedInt32();
  /** Shard ids in first-appearance order (the partition map's when there is one). */
  readonly shardIds: string[];
  readonly unassignedRows: number[] = [];
  unassignedCount = 0;
  droppedMissingLabel = 0;
  keptRows = 0;
  private readonly shardCodeOfId = new Map<string, number>();

  constructor(
    header: string[],
    private readonly fileName: string,
    private readonly positions: ColumnPositions,
    private readonly idColumn: string | undefined,
    private readonly partition: PartitionMap | null,
    private readonly sink: RowSink,
    decimalMark: DecimalMark = ".",
  ) {
    this.label = new ColumnAccumulator(header[positions.label], fileName, Infinity, decimalMark);
    this.features = positions.features.map(
      (index) => new ColumnAccumulator(header[index], fileName, MAX_ONE_HOT_LEVELS, decimalMark),
    );
    this.shardIds = partition ? partition.shardIds : [];
  }

  addRow(fields: string[], rowIndex: number): void {
    const { positions, partition } = this;
    let shardCode: number;
    if (partition) {
      const rowId = positions.id >= 0 ? trimToken(fields[positions.id]) : String(rowIndex);
      shardCode = partition.lookUp(rowId);
      if (shardCode === -2) {
        throw new AnalysisInputError(
          `the id ${quoteValue(rowId)} appears on more than one data row`,
          {
            file: this.fileName,
            row: rowIndex,
            column: this.idColumn,
            expected: "unique ids, so each row is assigned exactly once",
          },
        );
      }
    } else {
      const shard = trimToken(fields[positions.shard]);
      if (isMissingToken(shard)) {
        shardCode = -1;
      } else {
        const known = this.shardCodeOfId.get(shard);
        shardCode = known ?? this.shardIds.length;
        if (known === undefined) {
          this.shardIds.push(shard);
          this.shardCodeOfId.set(shard, shardCode);
        }
      }
    }
    if (isMissingToken(trimToken(fields[positions.label]))) {
      this.droppedMissingLabel++;
      return;
    }
    if (shardCode < 0) {
      this.unassignedCount++;
      if (this.unassignedRows.length < LISTED_OFFENDERS) this.unassignedRows.push(rowIndex);
      return;
    }
    this.labelValues.push(this.label.add(fields[positions.label], rowIndex));
    const offset = this.sink.appendRow();
    const values = this.sink.values;
    const features = this.features;
    const featureIndices = positions.features;
    for (let k = 0; k < featureIndices.length; k++) {
      values[offset + k] = features[k].add(fields[featureIndices[k]], rowIndex);
    }
    this.shardCodes.push(shardCode);
    this.keptRows++;
  }
}

/** Labelled rows without a shard: how many, and the first few (0-based data row indices). */
export interface UnassignedRows {
  count: number;
  firstRows: number[];
}

/**
 * The checks that need every row — the assignment (unassigned rows, unmatched partition ids) and at
 * least one kept row — and the dataset once they pass.
 */
export function completeDataset<FeatureValues extends Float64Array | StoredMatrix>(
  raw: Omit<RawDataset<FeatureValues>, "droppedUnassigned">,
  unassigned: UnassignedRows,
  columns: DatasetColumnChoice,
  {
    partition,
    dropUnassignedRows,
  }: { partition: PartitionMap | null; dropUnassignedRows: boolean },
): RawDataset<FeatureValues> {
  const { fileName, totalRows, keptRows } = raw;
  const { count: unassignedCount, firstRows: unassignedRows } = unassigned;
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

  return { ...raw, droppedUnassigned: dropUnassignedRows ? unassignedCount : 0 };
}
