import { createHash } from "node:crypto";
import { z } from "zod";

/**
 * The JSON documents of a federated analysis (methods.md §9). Every one is readable by a person and
 * holds counts and sums, never a row: a client's round-1 **schema digest**, the coordinator's
 * **encoding** (pooled preprocessing, quoted by its hash in every later digest), the round-2
 * **gradient digest** at the points the coordinator asked for, and the fit's **evaluation sums**.
 * Numbers are plain JSON numbers (a float64 written by JavaScript reads back to the same bits).
 */

/** A client refuses to send digests of a shard with fewer rows (methods.md §9's default). */
export const DEFAULT_MINIMUM_SHARD_ROWS = 10;
/** Cells of the regression target's histogram, between the pooled minimum and maximum (§9). */
export const TARGET_HISTOGRAM_CELLS = 4096;
/** A numeric label with more distinct values is only counted by level when classification is asked. */
const MAX_LABEL_LEVELS_SENT = 20;

const finite = z.number().finite();
const count = z.number().int().nonnegative();

/** Round 1, per feature column of one shard. */
const columnSchemaDigest = z.object({
  /** Non-missing values. */
  present: count,
  /**
   * Σx and Σ(x − x̄ₘ)² about the shard's own mean x̄ₘ = Σx/present (the second moment in the form
   * that merges without cancellation), min and max; null unless the column is numeric for this
   * client.
   */
  sum: finite.nullable(),
  sumSquaredDeviations: finite.nullable(),
  min: finite.nullable(),
  max: finite.nullable(),
  /** Count of each distinct token; null when the client saw more than 32 distinct values. */
  levels: z.record(z.string(), count).nullable(),
});

const shardSchemaDigest = z.object({
  id: z.string().min(1),
  /** Rows kept (label present). */
  rows: count,
  label: z.object({
    /** Σy, Σ(y − ȳₘ)², min, max while the label is numeric for this client, else null. */
    sum: finite.nullable(),
    sumSquaredDeviations: finite.nullable(),
    min: finite.nullable(),
    max: finite.nullable(),
    /** Rows per label value, when they can be classes; null for a many-valued numeric label. */
    levels: z.record(z.string(), count).nullable(),
  }),
  /** Per feature column, in the order of `features`. */
  columns: z.array(columnSchemaDigest),
});

export const schemaDigestSchema = z.object({
  kind: z.literal("partita-schema-digest"),
  version: z.literal(1),
  client: z.string().min(1),
  labelColumn: z.string(),
  features: z.array(z.string()),
  /** True when the user named the features (an unusable one is then an error, as in §1). */
  featuresNamed: z.boolean(),
  /** Whether every non-missing value of the label, and of each feature, parsed as a number. */
  labelNumeric: z.boolean(),
  columnsNumeric: z.array(z.boolean()),
  /**
   * Per feature column, how many of the non-missing values parse as finite numbers and how many do
   * not, so that methods.md §1's 95% rule can be judged over all rows of a column whose distinct
   * values were not all counted. Sent by the parts of one dataset (`countValueKinds`); a client's
   * digest leaves it out.
   */
  columnsValueKinds: z.array(z.object({ numbers: count, others: count })).optional(),
  totalRows: count,
  droppedRowsMissingLabel: count,
  droppedRowsUnassigned: count,
  shards: z.array(shardSchemaDigest),
});
export type SchemaDigest = z.infer<typeof schemaDigestSchema>;
export type ShardSchemaDigest = z.infer<typeof shardSchemaDigest>;

/** One encoded column of the design: a standardized numeric column or a one-hot level. */
const encodedColumn = z.discriminatedUnion("kind", [
  z.object({ kind: z.literal("numeric"), column: z.string(), mean: finite, std: finite }),
  z.object({
    kind: z.literal("level"),
    column: z.string(),
    level: z.string(),
    mean: finite,
    std: finite,
  }),
]);
export type EncodedColumn = z.infer<typeof encodedColumn>;

export const encodingSchema = z.object({
  kind: z.literal("partita-encoding"),
  version: z.literal(1),
  /** SHA-256 of this document without the hash (canonical JSON), quoted by every later digest. */
  hash: z.string().regex(/^[0-9a-f]{64}$/),
  labelColumn: z.string(),
  /** The clients' feature columns (the source columns; `columns` are the encoded ones). */
  sourceFeatures: z.array(z.string()),
  task: z.enum(["classification", "regression"]),
  /** Classes in code-point order; null for regression. */
  classes: z.array(z.string()).nullable(),
  /** The target's pooled mean and population deviation, and its min and max (regression). */
  target: z.object({ mean: finite, std: finite, min: finite, max: finite }).nullable(),
  columns: z.array(encodedColumn),
  featureNames: z.array(z.string()),
  omittedColumns: z.array(
    z.object({
      column: z.string(),
      reason: z.enum(["constant", "too-many-levels", "all-missing"]),
    }),
  ),
  warnings: z.array(z.string()),
  /** Rows and shards pooled in round 1: round 2 must cover exactly these. */
  rows: count,
  shardCount: count,
  minimumShardRows: count,
});
export type DigestEncoding = z.infer<typeof encodingSchema>;

const weightRows = z.array(z.array(finite)).min(1);

/**
 * What the coordinator asks in round 2: the reference point (with the per-sample noise sums) and the
 * point the path t·W runs to — W* after a fit, or the supplied point itself without one.
 */
export const measurementRequestSchema = z.object({
  encodingHash: z.string(),
  reference: z.enum(["optimum", "zero", "given"]),
  referenceWeights: weightRows,
  pathEnd: weightRows,
});
export type MeasurementRequest = z.infer<typeof measurementRequestSchema>;

/** Σℓᵢ, Σ∇ℓᵢ (regularizer excluded) and Σ‖∇ℓᵢ‖² of one shard at one point. */
const pointSums = z.object({
  lossSum: finite,
  gradientSum: z.array(finite),
  /** Null where the noise was not asked for (the path points). */
  squaredGradientNormSum: finite.nullable(),
});
export type PointSums = z.infer<typeof pointSums>;

const shardGradientDigest = z.object({
  id: z.string().min(1),
  rows: count,
  /** Rows per class (classification), else null. */
  labelCounts: z.array(count).nullable(),
  /** Regression: [cell, rows] for the non-empty cells of the standardized target's histogram. */
  targetHistogram: z.array(z.tuple([count, count])).nullable(),
  /** Σx̃ over the shard's rows (the d features; the bias's sum is `rows`). */
  featureSums: z.array(finite),
  /** At the reference point, then at t·pathEnd for each t of the path (methods.md §3). */
  atReference: pointSums,
  alongPath: z.array(pointSums),
});
export type ShardGradientDigest = z.infer<typeof shardGradientDigest>;

export const gradientDigestSchema = z.object({
  kind: z.literal("partita-gradient-digest"),
  version: z.literal(1),
  client: z.string().min(1),
  encodingHash: z.string(),
  request: measurementRequestSchema,
  totalRows: count,
  droppedRowsMissingLabel: count,
  droppedRowsUnassigned: count,
  /** Σ x̃ᵢx̃ᵢᵀ over the client's rows, (d+1) × (d+1), once per client (for H). */
  gram: z.array(z.array(finite)),
  shards: z.array(shardGradientDigest),
});
export type GradientDigest = z.infer<typeof gradientDigestSchema>;

/**
 * One evaluation of the coordinator's fit: at W, over all the client's rows or over its part of the
 * fit's strided subsample (global row g of the shard-ordered pooled rows is in it when g is a
 * multiple of `stride`; `shardStarts` gives each of the client's shards its first global row), and
 * with the subsample's Hessian sums when `hessian` is set.
 */
export const evaluationRequestSchema = z.object({
  encodingHash: z.string(),
  weights: z.array(finite),
  sample: z
    .object({ stride: z.number().int().positive(), shardStarts: z.record(z.string(), count) })
    .nullable(),
  hessian: z.boolean(),
});
export type EvaluationRequest = z.infer<typeof evaluationRequestSchema>;

/** One client's answer: Σℓᵢ and Σ∇ℓᵢ at W (and Σ∇²ℓᵢ, row-major, when asked). */
export const evaluationSumsSchema = z.object({
  rows: count,
  lossSum: finite,
  gradientSum: z.array(finite),
  hessianSum: z.array(finite).nullable(),
});
export type EvaluationSums = z.infer<typeof evaluationSumsSchema>;

/** Whether a numeric label's level counts go into the schema digest. */
export function sendsLabelLevels(
  labelNumeric: boolean,
  distinctLabels: number,
  requestedTask: "classification" | "regression" | undefined,
): boolean {
  if (requestedTask === "regression") return false;
  return (
    !labelNumeric || requestedTask === "classification" || distinctLabels <= MAX_LABEL_LEVELS_SENT
  );
}

/** SHA-256 of a document's canonical JSON (keys sorted), hex. */
export function hashDocument(document: unknown): string {
  return createHash("sha256").update(canonicalJson(document)).digest("hex");
}

function canonicalJson(value: unknown): string {
  if (Array.isArray(value)) return `[${value.map(canonicalJson).join(",")}]`;
  if (value !== null && typeof value === "object") {
    const entries = Object.entries(value as Record<string, unknown>)
      .filter(([, item]) => item !== undefined)
      .sort(([a], [b]) => (a < b ? -1 : a > b ? 1 : 0));
    return `{${entries.map(([key, item]) => `${JSON.stringify(key)}:${canonicalJson(item)}`).join(",")}}`;
  }
  return JSON.stringify(value);
}
