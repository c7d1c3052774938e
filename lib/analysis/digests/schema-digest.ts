import { CompensatedSum } from "../../math/summation";
import { CHUNK_LENGTH } from "../chunked-arrays";
import type { ColumnAccumulator } from "../column-accumulator";
import { MAX_ONE_HOT_LEVELS } from "../column-accumulator";
import type { Task } from "../design";
import { AnalysisInputError } from "../errors";
import type { RawDataset } from "../read-dataset";
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
}

/**
 * Round 1 of methods.md §9 for one client: per shard, the kept row count, the label's counts per
 * value (or Σy, Σy², min, max of a numeric label) and per feature column the count of non-missing
 * values, Σx, Σx², min, max and the count of each level. Refuses (AnalysisInputError naming client
 * and shard) a shard under the minimum rows, and, as the central analysis does, a named feature
 * that is neither numeric nor encodable.
 */
export function computeSchemaDigest(raw: RawDataset, options: SchemaDigestOptions): SchemaDigest {
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
  if (raw.featuresNamed) {
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
  const labelValues = raw.label.numeric
    ? summarizeColumn(raw, (row) => raw.labelValues[row])
    : null;
  const featureValues = raw.features.map((feature, k) =>
    feature.numeric ? summarizeColumn(raw, (row) => raw.featureValues[row * stride + k]) : null,
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
    totalRows: raw.totalRows,
    droppedRowsMissingLabel: raw.droppedMissingLabel,
    droppedRowsUnassigned: raw.droppedUnassigned,
    shards,
  };
}

const NO_VALUES = { sum: null, sumSquaredDeviations: null, min: null, max: null };

/**
 * Per shard, the count, Σx, min and max of a column's non-missing values, then (second pass)
 * Σ(x − x̄ₘ)² about the shard's mean: two passes, compensated sums, as the central moments are taken.
 */
function summarizeColumn(raw: RawDataset, valueAt: (row: number) => number) {
  const shards = raw.shardIds.map(() => ({
    sum: new CompensatedSum(),
    deviations: new CompensatedSum(),
    min: Infinity,
    max: -Infinity,
    present: 0,
  }));
  for (let row = 0; row < raw.keptRows; row++) {
    const value = valueAt(row);
    if (value !== value) continue;
    const shard = shards[raw.shardCodes[row]];
    shard.sum.add(value);
    if (value < shard.min) shard.min = value;
    if (value > shard.max) shard.max = value;
    shard.present++;
  }
  const means = shards.map((shard) => shard.sum.value / shard.present);
  for (let row = 0; row < raw.keptRows; row++) {
    const value = valueAt(row);
    if (value !== value) continue;
    const code = raw.shardCodes[row];
    const deviation = value - means[code];
    shards[code].deviations.add(deviation * deviation);
  }
  return shards.map((shard) =>
    shard.present === 0
      ? { ...NO_VALUES, present: 0 }
      : {
          sum: shard.sum.value,
          sumSquaredDeviations: shard.deviations.value,
          min: shard.min,
          max: shard.max,
          present: shard.present,
        },
  );
}

/** Per shard, the count of each level of a column (its codes, read chunk by chunk). */
function countLevelsPerShard(column: ColumnAccumulator, raw: RawDataset): Record<string, number>[] {
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
