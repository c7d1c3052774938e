import { quantileSorted } from "simple-statistics";

import { createMatrix, matrixFromValues, type Matrix } from "../math/matrix";
import { measureColumnMomentsInBlocks, measureMoments } from "../math/moments";
import { CompensatedSum } from "../math/summation";
import { compareCodePoints } from "./code-point-order";
import { CHUNK_LENGTH } from "./chunked-arrays";
import type { ColumnAccumulator } from "./column-accumulator";
import { MAX_ONE_HOT_LEVELS } from "./column-accumulator";
import type { Design, DesignOnDisk, OmittedColumn, Task } from "./design";
import { AnalysisInputError } from "./errors";
import { measureRowBudget, type MemorySettings } from "./memory-limit";
import type { RawDataset } from "./read-dataset";
import { quoteValue } from "./quote-value";
import { ValueBlocks, writeDesignToFile } from "./stored-encoding";
import { isStoredMatrix, type StoredMatrix } from "./stored-matrix";
import { MAX_CLASSES_FOR_NUMERIC_LABEL } from "./task-rules";

/** Columns whose population standard deviation is below this are dropped (methods.md §1). */
export const MIN_FEATURE_STD = 1e-12;
export { MAX_CLASSES_FOR_NUMERIC_LABEL };

/** One standardized column of the design and how to compute it from its source column. */
type EncodedColumn =
  | {
      kind: "numeric";
      source: ColumnAccumulator;
      /** Index of the source among the feature columns (its slot in `featureValues`). */
      sourceIndex: number;
      name: string;
      mean: number;
      std: number;
    }
  | {
      kind: "level";
      source: ColumnAccumulator;
      name: string;
      code: number;
      mean: number;
      std: number;
    };

/**
 * Turns the raw columns into the design of methods.md §1: task and classes, shard order,
 * imputation, one-hot encoding, standardization with pooled mean and population deviation, the bias
 * column, and rows regrouped shard by shard (one shard is fine here: the layout planner encodes the
 * whole dataset as one before splitting it; the analysis asks for two). When every feature column is numeric and kept — the
 * common case — the design is built in place in the memory the values were read into.
 */
export function encodeDesign(
  raw: RawDataset,
  requestedTask: Task | undefined,
  options?: { badNumbersAsMissing?: boolean; memory?: undefined },
): Design;
/**
 * With memory settings: values read into a scratch file (or a design that would outgrow the limit)
 * give a design on disk, the same values in a scratch file of its own; the values' file is closed.
 */
export function encodeDesign(
  raw: RawDataset<Float64Array | StoredMatrix>,
  requestedTask: Task | undefined,
  options: { badNumbersAsMissing?: boolean; memory?: MemorySettings },
): Design | DesignOnDisk;
export function encodeDesign(
  raw: RawDataset<Float64Array | StoredMatrix>,
  requestedTask: Task | undefined,
  {
    badNumbersAsMissing = false,
    memory,
  }: { badNumbersAsMissing?: boolean; memory?: MemorySettings } = {},
): Design | DesignOnDisk {
  const blocks = new ValueBlocks(raw.featureValues, raw.keptRows, raw.features.length + 1);
  try {
    return encodeBlocks(raw, blocks, requestedTask, badNumbersAsMissing, memory);
  } finally {
    blocks.close();
  }
}

function encodeBlocks(
  raw: RawDataset<Float64Array | StoredMatrix>,
  blocks: ValueBlocks,
  requestedTask: Task | undefined,
  badNumbersAsMissing: boolean,
  memory: MemorySettings | undefined,
): Design | DesignOnDisk {
  const warnings: string[] = [];
  const badNumbersCountedMissing = resolveBadNumbers(raw, badNumbersAsMissing);
  const rows = raw.keptRows;

  const shardOrder = sortedOrder(raw.shardIds);
  const shardIds = shardOrder.map((code) => raw.shardIds[code]);
  const rankOfShardCode = invert(shardOrder);
  const shardOffsets = new Int32Array(shardIds.length + 1);
  for (let row = 0; row < rows; row++) shardOffsets[rankOfShardCode[raw.shardCodes[row]] + 1]++;
  for (let m = 0; m < shardIds.length; m++) shardOffsets[m + 1] += shardOffsets[m];
  // Stable counting sort: position of each kept row once rows are grouped by shard.
  const position = new Int32Array(rows);
  const next = shardOffsets.slice(0, shardIds.length);
  for (let row = 0; row < rows; row++) position[row] = next[rankOfShardCode[raw.shardCodes[row]]]++;

  const target = encodeTarget(raw, requestedTask, position);
  const columns = planFeatureColumns(raw, blocks, warnings);
  const omittedColumns = columns.omitted;
  const width = columns.kept.length + 1;
  const x =
    memory !== undefined &&
    (isStoredMatrix(raw.featureValues) ||
      (!isEncodedInPlace(raw, columns.kept) &&
        (raw.featureValues.length + rows * width) * Float64Array.BYTES_PER_ELEMENT >
          measureRowBudget(memory)))
      ? writeDesignToFile(
          blocks,
          columns.kept,
          (row) => rankOfShardCode[raw.shardCodes[row]],
          shardOffsets,
          memory,
        )
      : encodeFeatures(raw as RawDataset, columns.kept, position);
  for (const feature of raw.features) feature.release();
  if (columns.kept.length === 0) {
    warnings.push("no usable feature columns: the model has only the bias");
  }

  const design = {
    task: target.task,
    classes: target.classes,
    labels: target.labels,
    targets: target.targets,
    skewCategories: target.skewCategories,
    skewCategoryCount: target.skewCategoryCount,
    ...(target.skewCategoryRanges ? { skewCategoryRanges: target.skewCategoryRanges } : {}),
    shardIds,
    shardOffsets,
    featureNames: columns.kept.map((column) => column.name),
    omittedColumns,
    droppedRowsMissingLabel: raw.droppedMissingLabel,
    droppedRowsUnassigned: raw.droppedUnassigned,
    badNumbersCountedMissing,
    warnings,
  };
  return isStoredMatrix(x) ? { ...design, x } : { ...design, x };
}

/**
 * Methods.md §1's numeric columns with bad values (at least 95% of the non-missing values are
 * numbers, some are not): an error naming the column, how many values and the first rows and values
 * — or, when the user chose so, those values count as missing. Returns the counts per column.
 */
function resolveBadNumbers(
  raw: RawDataset<Float64Array | StoredMatrix>,
  asMissing: boolean,
): { column: string; count: number }[] {
  const counted: { column: string; count: number }[] = [];
  for (const source of raw.features) {
    if (!source.hasBadNumbers) continue;
    if (!asMissing) {
      const examples = source.firstNonNumbers
        .map(({ row, token }) => `${quoteValue(token)} in data row ${row}`)
        .join(", ");
      throw new AnalysisInputError(
        `${source.nonNumberCount} of the column's ${source.numberCount + source.nonNumberCount} values are not numbers although the rest are (${examples}${source.nonNumberCount > source.firstNonNumbers.length ? ", …" : ""})`,
        {
          file: raw.fileName,
          row: source.firstNonNumbers[0].row,
          column: source.name,
          expected: `finite numbers with ${raw.format?.decimalMark === "," ? "a decimal comma" : "a decimal point"} or a missing-value token (empty, NA, N/A, NaN, null, None); or choose to treat such values as missing`,
        },
      );
    }
    counted.push({ column: source.name, count: source.countBadNumbersAsMissing() });
  }
  return counted;
}

interface EncodedTarget {
  task: Task;
  classes: string[] | null;
  labels: Int32Array | null;
  targets: Float64Array | null;
  skewCategories: Int32Array;
  skewCategoryCount: number;
  skewCategoryRanges?: [number, number][];
}

function encodeTarget(
  raw: RawDataset<Float64Array | StoredMatrix>,
  requested: Task | undefined,
  position: Int32Array,
): EncodedTarget {
  const label = raw.label;
  const rows = raw.keptRows;
  const task: Task =
    requested ??
    (!label.numeric || label.distinctCount <= MAX_CLASSES_FOR_NUMERIC_LABEL
      ? "classification"
      : "regression");

  if (task === "classification") {
    const order = sortedOrder(label.levels);
    const classes = order.map((code) => label.levels[code]);
    if (classes.length < 2) {
      throw new AnalysisInputError(`the label has a single class (${quoteValue(classes[0])})`, {
        file: raw.fileName,
        column: label.name,
        expected: "at least two classes",
      });
    }
    const rank = invert(order);
    const codes = label.takeCodes();
    const labels = new Int32Array(rows);
    for (let row = 0; row < rows; row++) labels[position[row]] = rank[codes[row]];
    label.release();
    return {
      task,
      classes,
      labels,
      targets: null,
      skewCategories: labels,
      skewCategoryCount: classes.length,
    };
  }

  if (!label.numeric) {
    const first = label.firstNonNumeric as { row: number; token: string };
    throw new AnalysisInputError(
      `regression needs a numeric label, found ${quoteValue(first.token)}`,
      {
        file: raw.fileName,
        row: first.row,
        column: label.name,
        expected: "a number",
      },
    );
  }
  const values = raw.labelValues;
  label.release();
  const { mean, std } = measureMoments(values);
  if (!(std >= MIN_FEATURE_STD)) {
    throw new AnalysisInputError("the label is constant", {
      file: raw.fileName,
      column: label.name,
      expected: "a label that varies",
    });
  }
  const targets = new Float64Array(rows);
  for (let row = 0; row < rows; row++) targets[position[row]] = (values[row] - mean) / std;
  const { categories, count } = binIntoDeciles(targets);
  return {
    task,
    classes: null,
    labels: null,
    targets,
    skewCategories: categories,
    skewCategoryCount: count,
    skewCategoryRanges: measureBinRanges(values, position, categories, count),
  };
}

/**
 * Each decile bin's smallest and largest label value, in the label's own units, so a reader sees
 * what the bins hold. `values` are in file order; `categories` are indexed by position.
 *
 * Example: labels 1…10 give ten bins [1, 1], [2, 2], …, [10, 10].
 */
function measureBinRanges(
  values: Float64Array,
  position: Int32Array,
  categories: Int32Array,
  count: number,
): [number, number][] {
  const ranges: [number, number][] = Array.from({ length: count }, () => [Infinity, -Infinity]);
  for (let row = 0; row < values.length; row++) {
    const range = ranges[categories[position[row]]];
    if (values[row] < range[0]) range[0] = values[row];
    if (values[row] > range[1]) range[1] = values[row];
  }
  return ranges;
}

/**
 * Regression's label-skew classes (methods.md §4): cut points at the k/10 quantiles (NumPy's linear
 * interpolation), row i in bin #{k : yᵢ > q_k}, empty bins dropped and the rest renumbered.
 */
export function binIntoDeciles(values: Float64Array): { categories: Int32Array; count: number } {
  // simple-statistics' quantileSorted is NumPy's linear method (type 7); it takes a plain array,
  // so the typed array is sorted (numerically, fast) before the copy.
  const sorted = Array.from(Float64Array.from(values).sort());
  const cuts = Array.from({ length: 9 }, (_, k) => quantileSorted(sorted, (k + 1) / 10));
  const raw = new Int32Array(values.length);
  const used = new Uint8Array(10);
  for (let row = 0; row < values.length; row++) {
    let bin = 0;
    for (const cut of cuts) if (values[row] > cut) bin++;
    raw[row] = bin;
    used[bin] = 1;
  }
  const renumber = new Int32Array(10);
  let count = 0;
  for (let bin = 0; bin < 10; bin++) if (used[bin]) renumber[bin] = count++;
  for (let row = 0; row < values.length; row++) raw[row] = renumber[raw[row]];
  return { categories: raw, count };
}

function planFeatureColumns(
  raw: RawDataset<Float64Array | StoredMatrix>,
  blocks: ValueBlocks,
  warnings: string[],
): { kept: EncodedColumn[]; omitted: OmittedColumn[] } {
  const kept: EncodedColumn[] = [];
  const omitted: OmittedColumn[] = [];
  const rows = raw.keptRows;
  const moments = measureNumericColumns(raw, blocks);
  for (const [sourceIndex, source] of raw.features.entries()) {
    if (source.missingCount === rows) {
      omitted.push({ column: source.name, reason: "all-missing" });
      warnings.push(`column ${quoteValue(source.name)} has no values and was left out`);
      continue;
    }
    if (source.numeric) {
      const { mean, std } = moments.get(sourceIndex) as { mean: number; std: number };
      if (std < MIN_FEATURE_STD) {
        omitted.push({ column: source.name, reason: "constant" });
        continue;
      }
      kept.push({ kind: "numeric", source, sourceIndex, name: source.name, mean, std });
      continue;
    }
    if (!source.hasLevels) {
      if (raw.featuresNamed) {
        const first = source.firstNonNumeric as { row: number; token: string };
        throw new AnalysisInputError(
          `the feature is not numeric (${quoteValue(first.token)}) and has more than ${MAX_ONE_HOT_LEVELS} distinct values`,
          {
            file: raw.fileName,
            row: first.row,
            column: source.name,
            expected: `numbers, or at most ${MAX_ONE_HOT_LEVELS} distinct categories`,
          },
        );
      }
      omitted.push({ column: source.name, reason: "too-many-levels" });
      warnings.push(
        `column ${quoteValue(source.name)} is not numeric and has more than ${MAX_ONE_HOT_LEVELS} distinct values; it was left out`,
      );
      continue;
    }
    const levels = source.levels;
    const counts = new Float64Array(levels.length);
    for (const codes of source.codeViews()) {
      for (let row = 0; row < codes.length; row++) if (codes[row] >= 0) counts[codes[row]]++;
    }
    for (const code of sortedOrder(levels)) {
      const mean = counts[code] / rows;
      const std = Math.sqrt(mean * (1 - mean));
      const name = `${source.name}=${levels[code]}`;
      if (std < MIN_FEATURE_STD) {
        omitted.push({ column: name, reason: "constant" });
        continue;
      }
      kept.push({ kind: "level", source, name, code, mean, std });
    }
  }
  return { kept, omitted };
}

/**
 * Mean and population deviation of every numeric feature column with values, after its missing
 * values are replaced by the mean of its present values (methods.md §1; in place when the values
 * are in memory); by source index.
 */
function measureNumericColumns(
  raw: RawDataset<Float64Array | StoredMatrix>,
  blocks: ValueBlocks,
): Map<number, { mean: number; std: number }> {
  const rows = raw.keptRows;
  const stride = blocks.stride;
  const numeric: number[] = [];
  raw.features.forEach((source, index) => {
    if (source.numeric && source.missingCount < rows) numeric.push(index);
  });
  const withMissing = numeric.filter((index) => raw.features[index].missingCount > 0);
  const present = withMissing.map(() => new CompensatedSum());
  if (withMissing.length > 0) {
    blocks.forEach((values, _firstRow, rowCount) => {
      withMissing.forEach((index, k) => {
        for (let row = 0; row < rowCount; row++) {
          const value = values[row * stride + index];
          if (value === value) present[k].add(value);
        }
      });
    });
  }
  blocks.fillMissing(
    withMissing.map((index, k) => ({
      index,
      value: present[k].value / (rows - raw.features[index].missingCount),
    })),
  );
  const moments = measureColumnMomentsInBlocks(blocks.visitor, rows, stride, numeric);
  return new Map(numeric.map((index, k) => [index, moments[k]]));
}

/** True when the kept columns are exactly the feature columns read, all numeric. */
function isEncodedInPlace(
  raw: RawDataset<Float64Array | StoredMatrix>,
  columns: EncodedColumn[],
): boolean {
  return (
    columns.length === raw.features.length &&
    columns.every((column, j) => column.kind === "numeric" && column.sourceIndex === j)
  );
}

/**
 * The design matrix of the kept columns: standardized features, then the bias 1, each kept row at
 * its shard-ordered `position`, in shared memory so the pass threads read it without a copy. When
 * the kept columns are exactly the feature columns, all numeric, the values read are standardized
 * and reordered where they are; otherwise the design is written anew.
 */
function encodeFeatures(raw: RawDataset, columns: EncodedColumn[], position: Int32Array): Matrix {
  const rows = raw.keptRows;
  const width = columns.length + 1;
  if (!isEncodedInPlace(raw, columns)) {
    const x = createMatrix(rows, width, { shared: true });
    writeDesign(raw, columns, position, x);
    return x;
  }
  const values = raw.featureValues;
  const means = Float64Array.from(columns, (column) => column.mean);
  const inverseStds = Float64Array.from(columns, (column) => 1 / column.std);
  for (let row = 0; row < rows; row++) {
    const base = row * width;
    for (let j = 0; j < width - 1; j++) {
      values[base + j] = (values[base + j] - means[j]) * inverseStds[j];
    }
    values[base + width - 1] = 1;
  }
  permuteRowsInPlace(values, width, position);
  return matrixFromValues(rows, width, values);
}

/**
 * Moves row r of a row-major table to row position[r] (a permutation) in place, cycle by cycle,
 * with one row of scratch per step; does nothing when every row is already in place.
 */
function permuteRowsInPlace(values: Float64Array, width: number, position: Int32Array): void {
  const rows = position.length;
  if (position.every((target, row) => target === row)) return;
  const moved = new Uint8Array(rows);
  const carried = new Float64Array(width);
  const displaced = new Float64Array(width);
  for (let start = 0; start < rows; start++) {
    if (moved[start] === 1 || position[start] === start) continue;
    carried.set(values.subarray(start * width, (start + 1) * width));
    let source = start;
    do {
      const target = position[source];
      displaced.set(values.subarray(target * width, (target + 1) * width));
      values.set(carried, target * width);
      carried.set(displaced);
      moved[source] = 1;
      source = target;
    } while (source !== start);
  }
}

/** Rows transposed together: their design rows (≤ 512 × width doubles) stay in cache meanwhile. */
const TRANSPOSE_ROWS = 512;

/**
 * Writes the standardized columns and the bias into a new design, each kept row at its
 * shard-ordered `position`: numbers from the row-major values read, one-hot levels from the
 * columns' codes (stored column by column in chunks). Rows are handled in small blocks, all
 * columns per block, which keeps the design rows being written in cache.
 */
function writeDesign(
  raw: RawDataset,
  columns: EncodedColumn[],
  position: Int32Array,
  x: Matrix,
): void {
  const width = x.cols;
  const out = x.data;
  const stride = raw.features.length + 1;
  const values = raw.featureValues;
  const codesOfSource = new Map<ColumnAccumulator, Int32Array[]>();
  const sourceCodes = columns.map((column) => {
    if (column.kind === "numeric") return [];
    let codes = codesOfSource.get(column.source);
    if (codes === undefined) {
      codes = column.source.codeViews();
      codesOfSource.set(column.source, codes);
    }
    return codes;
  });
  const scales = columns.map((column) => 1 / column.std);
  for (let chunk = 0; chunk * CHUNK_LENGTH < x.rows; chunk++) {
    const chunkStart = chunk * CHUNK_LENGTH;
    const chunkEnd = Math.min(x.rows, chunkStart + CHUNK_LENGTH);
    for (let blockStart = chunkStart; blockStart < chunkEnd; blockStart += TRANSPOSE_ROWS) {
      const blockEnd = Math.min(chunkEnd, blockStart + TRANSPOSE_ROWS);
      for (let j = 0; j < columns.length; j++) {
        const column = columns[j];
        const inverseStd = scales[j];
        if (column.kind === "numeric") {
          const source = column.sourceIndex;
          for (let row = blockStart; row < blockEnd; row++) {
            out[position[row] * width + j] =
              (values[row * stride + source] - column.mean) * inverseStd;
          }
        } else {
          const codes = sourceCodes[j][chunk];
          const high = (1 - column.mean) * inverseStd;
          const low = -column.mean * inverseStd;
          for (let row = blockStart; row < blockEnd; row++) {
            out[position[row] * width + j] = codes[row - chunkStart] === column.code ? high : low;
          }
        }
      }
      for (let row = blockStart; row < blockEnd; row++) out[position[row] * width + width - 1] = 1;
    }
  }
}

/** Indices of `values` in code-point order of the values. */
function sortedOrder(values: string[]): number[] {
  return values.map((_, index) => index).sort((a, b) => compareCodePoints(values[a], values[b]));
}

function invert(order: number[]): Int32Array {
  const rank = new Int32Array(order.length);
  order.forEach((code, index) => (rank[code] = index));
  return rank;
}
