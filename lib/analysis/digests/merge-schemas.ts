import { CompensatedSum } from "../../math/summation";
import { compareCodePoints, sortByCodePoint } from "../code-point-order";
import { MAX_ONE_HOT_LEVELS } from "../column-accumulator";
import type { OmittedColumn, Task } from "../design";
import { MAX_CLASSES_FOR_NUMERIC_LABEL, MIN_FEATURE_STD } from "../encode-design";
import { AnalysisInputError } from "../errors";
import {
  DEFAULT_MINIMUM_SHARD_ROWS,
  hashDocument,
  type DigestEncoding,
  type EncodedColumn,
  type SchemaDigest,
} from "./digest-format";

export interface MergeSchemasOptions {
  task?: Task;
  minimumShardRows?: number;
}

/** Count, sum and centred sum of squares of some values (one shard's, or pooled). */
interface Moments {
  present: number;
  sum: number;
  sumSquaredDeviations: number;
}

/**
 * The coordinator's side of round 1 (methods.md §9): checks the clients' schema digests agree (same
 * label and features, no shard sent twice, none under the minimum rows) and fixes the pooled
 * preprocessing of §1 exactly as the central encoder does — the task, the classes in code-point
 * order, imputation means, standardization with the pooled mean and population deviation, one-hot
 * levels (≤ 32, else left out), columns dropped as constant — and returns it as the encoding with
 * its hash. Problems are AnalysisInputErrors naming the client and shard.
 */
export function mergeSchemaDigests(
  digests: SchemaDigest[],
  options: MergeSchemasOptions = {},
): DigestEncoding {
  if (digests.length === 0) {
    throw new AnalysisInputError("no schema digests were given", {
      expected: "one schema digest per client",
    });
  }
  const minimum = options.minimumShardRows ?? DEFAULT_MINIMUM_SHARD_ROWS;
  checkSchemaAgreement(digests, minimum);
  const first = digests[0];
  const shards = digests.flatMap((digest) =>
    digest.shards.map((shard) => ({ ...shard, columnOf: columnIndexOf(digest) })),
  );
  const rows = shards.reduce((total, shard) => total + shard.rows, 0);
  if (shards.length < 2) {
    throw new AnalysisInputError(`the clients sent ${shards.length} shard`, {
      expected: "at least two shards over all clients",
    });
  }

  const labelNumeric = digests.every((digest) => digest.labelNumeric);
  const labelLevels = mergeLevels(shards.map((shard) => shard.label.levels));
  const task: Task =
    options.task ??
    (!labelNumeric || (labelLevels !== null && labelLevels.size <= MAX_CLASSES_FOR_NUMERIC_LABEL)
      ? "classification"
      : "regression");
  const { classes, target } = mergeLabel(task, labelNumeric, labelLevels, shards, first);

  const warnings: string[] = [];
  const columns: EncodedColumn[] = [];
  const omittedColumns: OmittedColumn[] = [];
  for (const name of first.features) {
    const parts = shards.map((shard) => shard.columns[shard.columnOf(name)]);
    const numeric = digests.every((digest) => digest.columnsNumeric[columnIndexOf(digest)(name)]);
    // A text column holds a token somewhere; one whose levels a client stopped counting (over 32)
    // sends no count of its values, so only a numeric column's count tells it is all missing.
    if (numeric && parts.every((part) => part.present === 0)) {
      omittedColumns.push({ column: name, reason: "all-missing" });
      warnings.push(`column "${name}" has no values and was left out`);
      continue;
    }
    if (numeric) {
      const moments = poolMoments(parts);
      const mean = moments.sum / moments.present;
      // Imputed values sit at the mean: they add rows to N but nothing to the deviations.
      const std = Math.sqrt(moments.sumSquaredDeviations / rows);
      if (std < MIN_FEATURE_STD) omittedColumns.push({ column: name, reason: "constant" });
      else columns.push({ kind: "numeric", column: name, mean, std });
      continue;
    }
    const levels = mergeLevels(parts.map((part) => part.levels));
    if (levels === null || levels.size > MAX_ONE_HOT_LEVELS) {
      if (first.featuresNamed) {
        throw new AnalysisInputError(
          `the feature is not numeric and has more than ${MAX_ONE_HOT_LEVELS} distinct values over all clients`,
          {
            column: name,
            expected: `numbers, or at most ${MAX_ONE_HOT_LEVELS} distinct categories`,
          },
        );
      }
      omittedColumns.push({ column: name, reason: "too-many-levels" });
      warnings.push(
        `column "${name}" is not numeric and has more than ${MAX_ONE_HOT_LEVELS} distinct values; it was left out`,
      );
      continue;
    }
    for (const level of sortByCodePoint(levels.keys())) {
      const mean = (levels.get(level) as number) / rows;
      const std = Math.sqrt(mean * (1 - mean));
      if (std < MIN_FEATURE_STD) {
        omittedColumns.push({ column: `${name}=${level}`, reason: "constant" });
        continue;
      }
      columns.push({ kind: "level", column: name, level, mean, std });
    }
  }
  if (columns.length === 0) warnings.push("no usable feature columns: the model has only the bias");

  const unsigned: Omit<DigestEncoding, "hash"> = {
    kind: "partita-encoding",
    version: 1,
    labelColumn: first.labelColumn,
    sourceFeatures: first.features,
    task,
    classes,
    target,
    columns,
    featureNames: columns.map((column) =>
      column.kind === "numeric" ? column.column : `${column.column}=${column.level}`,
    ),
    omittedColumns,
    warnings,
    rows,
    shardCount: shards.length,
    minimumShardRows: minimum,
  };
  return { ...unsigned, hash: hashDocument(unsigned) } as DigestEncoding;
}

/** The hash an encoding must carry: that of its content without the hash. */
export function computeEncodingHash(encoding: DigestEncoding): string {
  return hashDocument({ ...encoding, hash: undefined });
}

/**
 * Round 1's digests belong together: one per client, the same label and feature columns, no shard
 * sent twice, none under the minimum rows. A coordinator checks each arriving digest with those
 * already accepted, so a bad one is refused on arrival and the others stay.
 */
export function checkSchemaAgreement(digests: SchemaDigest[], minimum: number): void {
  const first = digests[0];
  const featureSet = [...first.features].sort(compareCodePoints).join("\u0000");
  const ownerOfShard = new Map<string, string>();
  const clients = new Set<string>();
  for (const digest of digests) {
    if (clients.has(digest.client)) {
      throw new AnalysisInputError(`client "${digest.client}" sent two schema digests`, {
        expected: "one schema digest per client",
      });
    }
    clients.add(digest.client);
    if (digest.labelColumn !== first.labelColumn) {
      throw new AnalysisInputError(
        `client "${digest.client}" used the label column "${digest.labelColumn}"`,
        { column: digest.labelColumn, expected: `the label column "${first.labelColumn}"` },
      );
    }
    if ([...digest.features].sort(compareCodePoints).join("\u0000") !== featureSet) {
      throw new AnalysisInputError(`client "${digest.client}" has other feature columns`, {
        expected: `the feature columns ${first.features.join(", ")}`,
      });
    }
    for (const shard of digest.shards) {
      const owner = ownerOfShard.get(shard.id);
      if (owner !== undefined) {
        throw new AnalysisInputError(
          `shard "${shard.id}" was sent twice (by client "${owner}" and by client "${digest.client}")`,
          { expected: "every shard held by exactly one client" },
        );
      }
      ownerOfShard.set(shard.id, digest.client);
      if (shard.rows < minimum) {
        throw new AnalysisInputError(
          `client "${digest.client}", shard "${shard.id}" has ${shard.rows} rows, under the minimum of ${minimum}`,
          { expected: `at least ${minimum} kept rows per shard` },
        );
      }
    }
  }
}

/** Maps a feature name to its index in a digest's column list. */
function columnIndexOf(digest: SchemaDigest): (name: string) => number {
  const index = new Map(digest.features.map((name, k) => [name, k]));
  return (name) => index.get(name) as number;
}

/** Pooled level counts; null when any part could not count its levels. */
function mergeLevels(parts: (Record<string, number> | null)[]): Map<string, number> | null {
  const pooled = new Map<string, number>();
  for (const part of parts) {
    if (part === null) return null;
    for (const [level, count] of Object.entries(part)) {
      if (count > 0) pooled.set(level, (pooled.get(level) ?? 0) + count);
    }
  }
  return pooled;
}

/**
 * Pools per-part moments (Chan, Golub & LeVeque, Amer. Statistician 37(3), 1983, the pairwise
 * update; from memory): M2 = Σ M2ₘ + Σ nₘ (x̄ₘ − x̄)², with compensated sums.
 */
export function poolMoments(
  parts: { present: number; sum: number | null; sumSquaredDeviations: number | null }[],
): Moments {
  const sum = new CompensatedSum();
  let present = 0;
  for (const part of parts) {
    if (part.present === 0) continue;
    sum.add(part.sum as number);
    present += part.present;
  }
  const mean = sum.value / present;
  const deviations = new CompensatedSum();
  for (const part of parts) {
    if (part.present === 0) continue;
    const shift = (part.sum as number) / part.present - mean;
    deviations.add(part.sumSquaredDeviations as number);
    deviations.add(part.present * shift * shift);
  }
  return { present, sum: sum.value, sumSquaredDeviations: deviations.value };
}

function mergeLabel(
  task: Task,
  labelNumeric: boolean,
  labelLevels: Map<string, number> | null,
  shards: SchemaDigest["shards"],
  first: SchemaDigest,
): Pick<DigestEncoding, "classes" | "target"> {
  if (task === "classification") {
    if (labelLevels === null) {
      throw new AnalysisInputError("a client did not count the label's values", {
        column: first.labelColumn,
        expected: "schema digests made with the task set to classification",
      });
    }
    const classes = sortByCodePoint(labelLevels.keys());
    if (classes.length < 2) {
      throw new AnalysisInputError(`the label has a single class ("${classes[0]}")`, {
        column: first.labelColumn,
        expected: "at least two classes",
      });
    }
    return { classes, target: null };
  }
  if (!labelNumeric) {
    throw new AnalysisInputError("regression needs a numeric label", {
      column: first.labelColumn,
      expected: "a number on every kept row of every client",
    });
  }
  const moments = poolMoments(shards.map((shard) => ({ present: shard.rows, ...shard.label })));
  const mean = moments.sum / moments.present;
  const std = Math.sqrt(moments.sumSquaredDeviations / moments.present);
  if (!(std >= MIN_FEATURE_STD)) {
    throw new AnalysisInputError("the label is constant", {
      column: first.labelColumn,
      expected: "a label that varies",
    });
  }
  const min = Math.min(...shards.map((shard) => shard.label.min as number));
  const max = Math.max(...shards.map((shard) => shard.label.max as number));
  return { classes: null, target: { mean, std, min, max } };
}
