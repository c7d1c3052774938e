import { z } from "zod";
import { DECIMAL_MARKS, DELIMITERS, TEXT_ENCODINGS } from "../analysis/text-format";

/**
 * Reference weights supplied by the user (methods.md §2, "uploaded weights"): one row per class (one
 * row for regression) over the encoded features in the report's order plus the bias last. This is
 * the shape of `model.optimum` in a summary, so a previous report's optimum can be reused.
 */
export const referenceWeightsSchema = z.object({
  classes: z.array(z.string()).nullable(),
  features: z.array(z.string()),
  weights: z.array(z.array(z.number().finite())).min(1),
});

export type ReferenceWeights = z.infer<typeof referenceWeightsSchema>;

/** S, the seeds the chosen step size is re-run on (methods.md §7: default 3). */
export const DEFAULT_SIMULATION_SEEDS = 3;
export const MAX_SIMULATION_SEEDS = 20;
/**
 * The largest estimated simulation cost, in multiply-adds, run without asking for more: the CLI's
 * default and the most the server runs for the web form and the API. At the roughly 10⁸
 * multiply-adds a second measured on one core (lib/reports/simulation-estimate.ts), about a
 * quarter of an hour.
 */
export const DEFAULT_SIMULATION_BUDGET = 1e11;

/**
 * The simulation of methods.md §7: S seeds for the chosen step size, the grid's seed (re-runs use
 * seed + 1 … seed + S) and the largest estimated cost in multiply-adds it may take.
 */
export const simulateOptionsSchema = z.object({
  seeds: z.number().int().min(1).max(MAX_SIMULATION_SEEDS).default(DEFAULT_SIMULATION_SEEDS),
  seed: z
    .number()
    .int()
    .min(0)
    .max(2 ** 32 - 1)
    .default(1),
  budget: z.number().finite().positive().default(DEFAULT_SIMULATION_BUDGET),
});

/** A CSV's reading options as the user chose them; what is absent is detected (methods.md §1). */
export const csvFormatChoiceSchema = z.object({
  encoding: z.enum(TEXT_ENCODINGS).optional(),
  delimiter: z.enum(DELIMITERS).optional(),
  decimalMark: z.enum(DECIMAL_MARKS).optional(),
});

const columnName = z.string().trim().min(1, "a column name cannot be empty");

/** methods.md §5 and §2 defaults of the plan: λ = 1e-3, K = 10 local steps, R = 100 rounds, b = 32. */
export const PLAN_DEFAULTS = { lambda: 1e-3, localSteps: 10, rounds: 100, batchSize: 32 } as const;

/**
 * Options of one partition analysis, shared by the CLI, the API and the web form. Defaults are those
 * of methods.md and issue 3: λ = 1e-3, K = 10, R = 100, b = 32, M = all shards.
 */
export const analysisOptionsSchema = z
  .object({
    labelColumn: columnName,
    idColumn: columnName.optional(),
    shardColumn: columnName.optional(),
    features: z.array(columnName).min(1, "name at least one feature column").optional(),
    task: z.enum(["classification", "regression"]).optional(),
    lambda: z.number().finite().positive("λ must be positive").default(PLAN_DEFAULTS.lambda),
    reference: z
      .union([z.literal("optimum"), z.literal("zero"), referenceWeightsSchema])
      .default("optimum"),
    participants: z.number().int().positive().optional(),
    localSteps: z.number().int().positive().default(PLAN_DEFAULTS.localSteps),
    rounds: z.number().int().positive().default(PLAN_DEFAULTS.rounds),
    batchSize: z.number().int().positive().default(PLAN_DEFAULTS.batchSize),
    /** The dataset's text encoding (methods.md §1). */
    encoding: z.enum(TEXT_ENCODINGS).default("utf-8"),
    /** The dataset's field delimiter; absent: detected from the header and first rows. */
    delimiter: z.enum(DELIMITERS).optional(),
    /** The dataset's decimal mark; absent: detected ("," only when ";" delimits). */
    decimalMark: z.enum(DECIMAL_MARKS).optional(),
    /**
     * Count the values that are not numbers in a mostly numeric column as missing instead of
     * rejecting the input (methods.md §1's numeric column with bad values).
     */
    badNumbersAsMissing: z.boolean().default(false),
    /** Drop labelled rows the partition does not assign instead of rejecting the input. */
    dropUnassignedRows: z.boolean().default(false),
    /** Also simulate the algorithms under the plan (methods.md §7); absent: no simulation. */
    simulate: simulateOptionsSchema.optional(),
  })
  .refine(
    (options) => !options.features || new Set(options.features).size === options.features.length,
    {
      message: "a feature column is named twice",
      path: ["features"],
    },
  );

/** Options as given by a caller (defaults optional). */
export type AnalysisOptionsInput = z.input<typeof analysisOptionsSchema>;
/** Options after defaults are applied. */
export type AnalysisOptions = z.output<typeof analysisOptionsSchema>;
