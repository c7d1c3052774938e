import { createMatrix, type Matrix } from "../../math/matrix";
import { compareCodePoints } from "../code-point-order";
import { CHUNK_LENGTH } from "../chunked-arrays";
import { AnalysisInputError } from "../errors";
import { readPartitionMap, type PartitionMap } from "../partition-map";
import { readDataset, type DatasetColumnChoice, type RawDataset } from "../read-dataset";
import type { TableSource } from "../table-reader";
import type { ColumnAccumulator } from "../column-accumulator";
import { measureRowBudget, type MemorySettings } from "../memory-limit";
import { ValueBlocks, writeDesignToFile, type StandardizedColumn } from "../stored-encoding";
import { isStoredMatrix, type StoredMatrix } from "../stored-matrix";
import type { DigestEncoding } from "./digest-format";

/** Where a client's rows come from: its data file and how its rows map to shards. */
export interface ClientRowsInput {
  /** The client's data: CSV, gzip CSV or Parquet, as a stream or a local file. */
  data: TableSource;
  dataName: string;
  /** A `row_id,shard` partition map (methods.md §1). */
  partition?: TableSource;
  partitionName?: string;
  /** Every kept row belongs to this one shard (a client that is one shard). */
  shard?: string;
  columns: DatasetColumnChoice;
  dropUnassignedRows?: boolean;
  /** Index in the whole file of the first data row, when `data` is a part of a CSV file. */
  firstRowIndex?: number;
  /** The memory limit: values read beyond its share go to a scratch file (row-store.ts). */
  memory?: MemorySettings;
}

/**
 * Reads a client's rows with the engine's own reader (methods.md §1: missing labels dropped and
 * counted, every kept row assigned to a shard by the shard column, the partition map or `shard`).
 * Any row source that yields a RawDataset — a whole file, a part of one — serves as a client.
 */
export async function readClientRows(
  input: ClientRowsInput & { memory?: undefined },
): Promise<RawDataset>;
export async function readClientRows(
  input: ClientRowsInput,
): Promise<RawDataset<Float64Array | StoredMatrix>>;
export async function readClientRows(
  input: ClientRowsInput,
): Promise<RawDataset<Float64Array | StoredMatrix>> {
  const ways = [input.partition, input.columns.shardColumn, input.shard].filter(
    (way) => way !== undefined,
  );
  if (ways.length !== 1) {
    throw new AnalysisInputError(
      ways.length === 0 ? "no shard was given" : "more than one way to find shards was given",
      { expected: "exactly one of a shard column, a partition map or a single shard name" },
    );
  }
  const partition = input.partition
    ? await readPartitionMap(input.partition, input.partitionName ?? "partition map", {
        byRowIndex: input.columns.idColumn === undefined,
      })
    : input.shard !== undefined
      ? wholeFileAsShard(input.shard, input.dataName)
      : null;
  return readDataset(input.data, input.dataName, input.columns, {
    partition,
    dropUnassignedRows: input.dropUnassignedRows ?? false,
    firstRowIndex: input.firstRowIndex,
    memory: input.memory,
  });
}

/** A partition that puts every row in one shard. */
function wholeFileAsShard(shard: string, fileName: string): PartitionMap {
  return { fileName, shardIds: [shard], lookUp: () => 0, findUnmatched: () => [] };
}

/**
 * A client's rows encoded with the pooled encoding: the same design the central analysis builds for
 * these rows (methods.md §1), shards in code-point order of their ids.
 */
export interface ClientDesign {
  fileName: string;
  /** Data rows in the client's file, and those dropped (methods.md §1). */
  totalRows: number;
  droppedRowsMissingLabel: number;
  droppedRowsUnassigned: number;
  /** In memory, or in a scratch file when the rows do not fit the memory limit (the caller closes it). */
  x: Matrix | StoredMatrix;
  labels: Int32Array | null;
  targets: Float64Array | null;
  shardIds: string[];
  shardOffsets: Int32Array;
}

/**
 * Encodes a client's kept rows with the coordinator's encoding: a numeric column's missing values
 * become the pooled mean, every column is standardized as (x − mean)·(1/std) like the central
 * encoder, one-hot levels take (1 − mean)/std or −mean/std, the bias 1 is appended, and rows are
 * regrouped shard by shard. With memory settings, as the central encoder does: values read into a
 * scratch file, or values and design together beyond the limit's share, give a design written to
 * a scratch file of its own, the same numbers.
 */
export function encodeClientRows(
  raw: RawDataset<Float64Array | StoredMatrix>,
  encoding: DigestEncoding,
  memory?: MemorySettings,
): ClientDesign {
  const rows = raw.keptRows;
  const order = raw.shardIds
    .map((_, code) => code)
    .sort((a, b) => compareCodePoints(raw.shardIds[a], raw.shardIds[b]));
  const rank = new Int32Array(order.length);
  order.forEach((code, index) => (rank[code] = index));
  const shardOffsets = new Int32Array(order.length + 1);
  for (let row = 0; row < rows; row++) shardOffsets[rank[raw.shardCodes[row]] + 1]++;
  for (let m = 0; m < order.length; m++) shardOffsets[m + 1] += shardOffsets[m];
  const next = shardOffsets.slice(0, order.length);
  const position = new Int32Array(rows);
  for (let row = 0; row < rows; row++) position[row] = next[rank[raw.shardCodes[row]]]++;

  const width = encoding.columns.length + 1;
  const sourceIndex = new Map(raw.features.map((feature, index) => [feature.name, index]));
  const numeric: NumericPlan[] = [];
  const levels: LevelPlan[] = [];
  encoding.columns.forEach((column, j) => {
    const source = sourceIndex.get(column.column);
    if (source === undefined) {
      throw new AnalysisInputError(`the data has no feature column "${column.column}"`, {
        file: raw.fileName,
        column: column.column,
        expected: `the encoding's feature columns: ${encoding.sourceFeatures.join(", ")}`,
      });
    }
    const inverseStd = 1 / column.std;
    if (column.kind === "numeric") {
      numeric.push({ column: j, source, mean: column.mean, std: column.std, inverseStd });
      return;
    }
    const accumulator = raw.features[source];
    levels.push({
      column: j,
      source: accumulator,
      codes: accumulator.hasLevels ? accumulator.codeViews() : [],
      // -1 when the client never saw the level: no row has it (a missing value's code, −1 too,
      // never counts as a match).
      code: accumulator.hasLevels ? accumulator.levels.indexOf(column.level) : -1,
      mean: column.mean,
      std: column.std,
      high: (1 - column.mean) * inverseStd,
      low: -column.mean * inverseStd,
    });
  });
  const shardOfRow = (row: number) => rank[raw.shardCodes[row]];
  const x =
    isStoredMatrix(raw.featureValues) ||
    (memory !== undefined &&
      (raw.featureValues.length + rows * width) * Float64Array.BYTES_PER_ELEMENT >
        measureRowBudget(memory))
      ? writeClientDesign(raw, numeric, levels, shardOfRow, shardOffsets, memory)
      : encodeInMemory(raw as RawDataset, width, numeric, levels, position);
  return {
    fileName: raw.fileName,
    totalRows: raw.totalRows,
    droppedRowsMissingLabel: raw.droppedMissingLabel,
    droppedRowsUnassigned: raw.droppedUnassigned,
    x,
    ...encodeClientTarget(raw, encoding, position),
    shardIds: order.map((code) => raw.shardIds[code]),
    shardOffsets,
  };
}

/** How one column of the client's encoding is computed from the values read: a number … */
interface NumericPlan {
  column: number;
  source: number;
  mean: number;
  std: number;
  inverseStd: number;
}
/** … or one level of a category. */
interface LevelPlan {
  column: number;
  source: ColumnAccumulator;
  codes: Int32Array[];
  /** The level's code in the source; −1 when the client never saw the level. */
  code: number;
  mean: number;
  std: number;
  high: number;
  low: number;
}

/** The design in shared memory, every kept row at its shard-ordered `position`. */
function encodeInMemory(
  raw: RawDataset,
  width: number,
  numeric: NumericPlan[],
  levels: LevelPlan[],
  position: Int32Array,
): Matrix {
  const rows = raw.keptRows;
  const x = createMatrix(rows, width, { shared: true });
  const stride = raw.features.length + 1;
  const numericColumns = Int32Array.from(numeric, (entry) => entry.column);
  const numericSources = Int32Array.from(numeric, (entry) => entry.source);
  const means = Float64Array.from(numeric, (entry) => entry.mean);
  const inverseStds = Float64Array.from(numeric, (entry) => entry.inverseStd);
  const values = raw.featureValues;
  // Row by row, every column of a row together: the row read and the row written stay in cache.
  for (let row = 0; row < rows; row++) {
    const from = row * stride;
    const to = position[row] * width;
    for (let k = 0; k < numericColumns.length; k++) {
      const value = values[from + numericSources[k]];
      const mean = means[k];
      const filled = value === value ? value : mean;
      x.data[to + numericColumns[k]] = (filled - mean) * inverseStds[k];
    }
    const chunk = Math.floor(row / CHUNK_LENGTH);
    const inChunk = row - chunk * CHUNK_LENGTH;
    for (const { column, codes, code, high, low } of levels) {
      x.data[to + column] = code >= 0 && codes[chunk][inChunk] === code ? high : low;
    }
    x.data[to + width - 1] = 1;
  }
  return x;
}

/**
 * The design written to a scratch file by the central encoder's writer (stored-encoding.ts): the
 * values are read block by block (from memory, or from their own scratch file), a numeric column's
 * missing values filled with the pooled mean in each block read — the values themselves unchanged.
 */
function writeClientDesign(
  raw: RawDataset<Float64Array | StoredMatrix>,
  numeric: NumericPlan[],
  levels: LevelPlan[],
  shardOfRow: (row: number) => number,
  shardOffsets: Int32Array,
  memory: MemorySettings | undefined,
): StoredMatrix {
  if (memory === undefined) {
    throw new Error("values kept in a scratch file need the memory settings they were read with");
  }
  const blocks = new ValueBlocks(raw.featureValues, raw.keptRows, raw.features.length + 1, {
    keepValues: true,
  });
  blocks.fillMissing(numeric.map(({ source, mean }) => ({ index: source, value: mean })));
  const columns: StandardizedColumn[] = [];
  for (const { column, source, mean, std } of numeric) {
    columns[column] = { kind: "numeric", sourceIndex: source, mean, std };
  }
  for (const { column, source, code, mean, std } of levels) {
    columns[column] = { kind: "level", source, code, mean, std };
  }
  return writeDesignToFile(blocks, columns, shardOfRow, shardOffsets, memory);
}

function encodeClientTarget(
  raw: RawDataset<Float64Array | StoredMatrix>,
  encoding: DigestEncoding,
  position: Int32Array,
): Pick<ClientDesign, "labels" | "targets"> {
  const rows = raw.keptRows;
  if (encoding.classes !== null) {
    const classOf = new Map(encoding.classes.map((name, index) => [name, index]));
    const levelClass = raw.label.levels.map((level) => {
      const index = classOf.get(level);
      if (index === undefined) {
        throw new AnalysisInputError(`the label value "${level}" is not one of the classes`, {
          file: raw.fileName,
          column: raw.label.name,
          expected: `one of ${encoding.classes?.join(", ")} (the encoding's classes)`,
        });
      }
      return index;
    });
    const codes = raw.label.takeCodes();
    const labels = new Int32Array(new SharedArrayBuffer(rows * Int32Array.BYTES_PER_ELEMENT));
    for (let row = 0; row < rows; row++) labels[position[row]] = levelClass[codes[row]];
    return { labels, targets: null };
  }
  const { mean, std } = encoding.target as { mean: number; std: number };
  const targets = new Float64Array(new SharedArrayBuffer(rows * Float64Array.BYTES_PER_ELEMENT));
  for (let row = 0; row < rows; row++) {
    const value = raw.labelValues[row];
    if (value !== value) {
      throw new AnalysisInputError("regression needs a numeric label", {
        file: raw.fileName,
        column: raw.label.name,
        expected: "a number on every kept row",
      });
    }
    targets[position[row]] = (value - mean) / std;
  }
  return { labels: null, targets };
}
