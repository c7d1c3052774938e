import { roundingError } from "../../math/summation";
import { CHUNK_LENGTH } from "../chunked-arrays";
import type { ColumnAccumulator } from "../column-accumulator";
import { MAX_ONE_HOT_LEVELS } from "../column-accumulator";
import type { Task } from "../design";
import { AnalysisInputError } from "../errors";
import type { RawDataset } from "../read-dataset";
import { ValueBlocks } from "../stored-encoding";
import type { StoredMatrix } from "../stored-matrix";
import {
  DEFAULT_MINIMUM_SHARD_ROWS,
  sendsLabelLevels,
  type SchemaDigest,
  type ShardSchemaDigest,
} from "./digest-format";

export interface SchemaDigestOptions {
  /** The client's name, quoted in messages and on the roster. */
  client: string;
  /** The task when the analysis fixes it (else chosen from the pooled label, methods.md §1). */
  task?: Task;
  /** Shards with fewer kept rows are refused (methods.md §9; default 10). */
  minimumShardRows?: number;
  /**
   * Whether a named feature that is neither numeric nor encodable is refused here (default); a
   * part of one dataset leaves that to its coordinator, which judges the column over all rows.
   */
  refuseUnencodable?: boolean;
  /** Whether the digest counts each column's numbers and other values (`columnsValueKinds`). */
  countValueKinds?: boolean;
}

/**
 * Round 1 of methods.md §9 for one client: per shard, the kept row count, the label's counts per
 * value (or Σy, Σy², min, max of a numeric label) and per feature column the count of non-missing
 * values, Σx, Σx², min, max and the count of each level. Refuses (AnalysisInputError naming client
 * and shard) a shard under the minimum rows, and, as the central analysis does, a named feature
 * that is neither numeric nor encodable.
 */
export function computeSchemaDigest(
  raw: RawDataset<Float64Array | StoredMatrix>,
  options: SchemaDigestOptions,
): SchemaDigest {
  const minimum = options.minimumShardRows ?? DEFAULT_MINIMUM_SHARD_ROWS;
  const shardCount = raw.shardIds.length;
  const shardRows = new Array<number>(shardCount).fill(0);
  for (let row = 0; row < raw.keptRows; row++) shardRows[raw.shardCodes[row]]++;
  raw.shardIds.forEach((id, code) => {
    if (shardRows[code] < minimum) {
      throw new AnalysisInputError(
        `client "${options.client}", shard "${id}" has ${shardRows[code]} rows, under the minimum of ${minimum}: its digests are not sent`,
        { file: raw.fileName, expected: `at least ${minimum} kept rows per shard` },
      );
    }
  });
  if (raw.featuresNamed && options.refuseUnencodable !== false) {
    for (const feature of raw.features) {
      if (!feature.numeric && !feature.hasLevels) {
        const first = feature.firstNonNumeric as { row: number; token: string };
        throw new AnalysisInputError(
          `the feature is not numeric ("${first.token}") and has more than ${MAX_ONE_HOT_LEVELS} distinct values`,
          {
            file: raw.fileName,
            row: first.row,
            column: feature.name,
            expected: `numbers, or at most ${MAX_ONE_HOT_LEVELS} distinct categories`,
          },
        );
      }
    }
  }

  const stride = raw.features.length + 1;
  const labelLevels = sendsLabelLevels(raw.label.numeric, raw.label.distinctCount, options.task)
    ? countLevelsPerShard(raw.label, raw)
    : null;
  const featureLevels = raw.features.map((feature) =>
    feature.hasLevels ? countLevelsPerShard(feature, raw) : null,
  );
  // The label's count of values is the shard's rows: it is not sent twice.
  const labelValues = raw.label.numeric
    ? summarizeColumns(raw, raw.labelValues, 1, [0])[0].map(
        ({ sum, sumSquaredDeviations, min, max }) => ({ sum, sumSquaredDeviations, min, max }),
      )
    : null;
  const numericFeatures = raw.features.flatMap((feature, k) => (feature.numeric ? [k] : []));
  const numericSummaries = summarizeColumns(raw, raw.featureValues, stride, numericFeatures);
  const featureValues = raw.features.map((feature, k) =>
    feature.numeric ? numericSummaries[numericFeatures.indexOf(k)] : null,
  );
  const shards: ShardSchemaDigest[] = raw.shardIds.map((id, code) => ({
    id,
    rows: shardRows[code],
    label: {
      ...(labelValues?.[code] ?? NO_VALUES),
      levels: labelLevels && labelLevels[code],
    },
    columns: raw.features.map((_, k) => {
      const levels = featureLevels[k]?.[code] ?? null;
      const { present, ...values } = featureValues[k]?.[code] ?? {
        ...NO_VALUES,
        present: countPresent(levels ?? {}),
      };
      return { present, ...values, levels };
    }),
  }));
  return {
    kind: "partita-schema-digest",
    version: 1,
    client: options.client,
    labelColumn: raw.label.name,
    features: raw.features.map((feature) => feature.name),
    featuresNamed: raw.featuresNamed,
    labelNumeric: raw.label.numeric,
    columnsNumeric: raw.features.map((feature) => feature.numeric),
    ...(options.countValueKinds && {
      columnsValueKinds: raw.features.map((feature) => ({
        numbers: feature.numberCount,
        others: feature.nonNumberCount,
      })),
    }),
    totalRows: raw.totalRows,
    droppedRowsMissingLabel: raw.droppedMissingLabel,
    droppedRowsUnassigned: raw.droppedUnassigned,
    shards,
  };
}

const NO_VALUES = { sum: null, sumSquaredDeviations: null, min: null, max: null };

/**
 * Per column and shard, the count, Σx, min and max of the non-missing values, then (second pass)
 * Σ(x − x̄ₘ)² about the shard's mean: two passes, Neumaier-compensated sums (as CompensatedSum
 * adds, value by value in row order), as the central moments are taken. `values` is row-major with
 * `stride` numbers per row; each pass reads the rows once, every column of a row together.
 */
function summarizeColumns(
  raw: RawDataset<Float64Array | StoredMatrix>,
  values: Float64Array | StoredMatrix,
  stride: number,
  columns: number[],
) {
  // Values in a scratch file are read block by block, the rows in the same order: the same sums.
  const blocks = new ValueBlocks(values, raw.keptRows, stride);
  const count = columns.length;
  const cells = raw.shardIds.length * count;
  const sums = new Float64Array(cells);
  const sumCompensations = new Float64Array(cells);
  const deviations = new Float64Array(cells);
  const deviationCompensations = new Float64Array(cells);
  const mins = new Float64Array(cells).fill(Infinity);
  const maxes = new Float64Array(cells).fill(-Infinity);
  const present = new Float64Array(cells);
  const offsets = Int32Array.from(columns);
  blocks.forEach((block, firstRow, rowCount) => {
    for (let k = 0; k < rowCount; k++) {
      const base = k * stride;
      const first = raw.shardCodes[firstRow + k] * count;
      for (let c = 0; c < count; c++) {
        const value = block[base + offsets[c]];
        if (value !== value) continue;
        const cell = first + c;
        const total = sums[cell];
        const next = total + value;
        sumCompensations[cell] += roundingError(total, value, next);
        sums[cell] = next;
        if (value < mins[cell]) mins[cell] = value;
        if (value > maxes[cell]) maxes[cell] = value;
        present[cell]++;
      }
    }
  });
  const means = sums.map((sum, cell) => (sum + sumCompensations[cell]) / present[cell]);
  blocks.forEach((block, firstRow, rowCount) => {
    for (let k = 0; k < rowCount; k++) {
      const base = k * stride;
      const first = raw.shardCodes[firstRow + k] * count;
      for (let c = 0; c < count; c++) {
        const value = block[base + offsets[c]];
        if (value !== value) continue;
        const cell = first + c;
        const deviation = value - means[cell];
        const squared = deviation * deviation;
        const total = deviations[cell];
        const next = total + squared;
        deviationCompensations[cell] += roundingError(total, squared, next);
        deviations[cell] = next;
      }
    }
  });
  return columns.map((_, k) =>
    raw.shardIds.map((_id, code) => {
      const cell = code * count + k;
      return present[cell] === 0
        ? { ...NO_VALUES, present: 0 }
        : {
            sum: sums[cell] + sumCompensations[cell],
            sumSquaredDeviations: deviations[cell] + deviationCompensations[cell],
            min: mins[cell],
            max: maxes[cell],
            present: present[cell],
          };
    }),
  );
}

/** Per shard, the count of each level of a column (its codes, read chunk by chunk). */
function countLevelsPerShard(
  column: ColumnAccumulator,
  raw: RawDataset<Float64Array | StoredMatrix>,
): Record<string, number>[] {
  const levels = column.levels;
  const counts = raw.shardIds.map(() => new Array<number>(levels.length).fill(0));
  column.codeViews().forEach((codes, chunk) => {
    for (let k = 0; k < codes.length; k++) {
      if (codes[k] >= 0) counts[raw.shardCodes[chunk * CHUNK_LENGTH + k]][codes[k]]++;
    }
  });
  return counts.map((shard) =>
    Object.fromEntries(
      levels.flatMap((level, code) => (shard[code] > 0 ? [[level, shard[code]]] : [])),
    ),
  );
}

function countPresent(levels: Record<string, number>): number {
  return Object.values(levels).reduce((a, b) => a + b, 0);
}
