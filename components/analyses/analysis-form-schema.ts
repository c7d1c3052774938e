import { z } from "zod";
import { DECIMAL_MARKS, DELIMITERS, TEXT_ENCODINGS } from "@/lib/analysis/browser";
import {
  DEFAULT_SIMULATION_SEEDS,
  MAX_SIMULATION_SEEDS,
  PLAN_DEFAULTS,
  type AnalysisOptionsInput,
} from "@/lib/validation/analysis-options";
import { startAnalysisSchema, type StartAnalysisInput } from "@/lib/validation/start-analysis";

// The new-analysis form's values and their validation. Field names follow the request's own paths
// ("datasetFileId", "options.labelColumn", …), so an error from startAnalysisSchema — here in the
// browser or from the server action — lands on the field it is about. A few choices exist only in
// the form (where the shards come from, which reference point, all shards or a sample).

const wholeNumber = (what: string) =>
  z
    .number({ message: `Enter the ${what} as a whole number.` })
    .int(`Enter the ${what} as a whole number.`)
    .min(1, `The ${what} must be at least 1.`);

/** A delimiter or decimal mark the user chose, or "" for the one detected in the file. */
const detectedOr = <T extends readonly [string, ...string[]]>(values: T) =>
  z.union([z.literal(""), z.enum(values)]);

/** S of methods.md §7, checked only when the simulation is asked for. */
const simulationSeeds = wholeNumber("number of seeds").max(
  MAX_SIMULATION_SEEDS,
  `Use at most ${MAX_SIMULATION_SEEDS} seeds.`,
);

export const analysisFormSchema = z
  .object({
    title: z.string().max(120, "Keep the title under 120 characters."),
    datasetFileId: z.string().min(1, "Upload or choose a dataset."),
    layoutSource: z.enum(["column", "file"]),
    layoutFileId: z.string(),
    referenceSource: z.enum(["optimum", "zero", "weights"]),
    weightsFileId: z.string(),
    participantsMode: z.enum(["all", "sample"]),
    previousReportId: z.string(),
    options: z.object({
      labelColumn: z.string().min(1, "Choose the column that holds the label."),
      idColumn: z.string(),
      shardColumn: z.string(),
      features: z.array(z.string()),
      task: z.enum(["auto", "classification", "regression"]),
      lambda: z
        .number({ message: "Enter λ as a number, e.g. 0.001." })
        .positive("λ must be greater than 0.")
        .finite("Enter λ as a number, e.g. 0.001."),
      // NaN is what an emptied number input gives; it matters only for a sample of shards.
      participants: z.number().or(z.nan()).optional(),
      localSteps: wholeNumber("number of local steps"),
      rounds: wholeNumber("number of rounds"),
      batchSize: wholeNumber("batch size"),
      dropUnassignedRows: z.boolean(),
      // How the CSV is read (methods.md §1): the encoding set from the upload's detection, the
      // delimiter and decimal mark "" while the detected ones apply.
      encoding: z.enum(TEXT_ENCODINGS),
      delimiter: detectedOr(DELIMITERS),
      decimalMark: detectedOr(DECIMAL_MARKS),
      badNumbersAsMissing: z.boolean(),
      // "Also simulate" (methods.md §7); NaN is an emptied seeds field.
      simulate: z.object({ enabled: z.boolean(), seeds: z.number().or(z.nan()) }),
    }),
  })
  .superRefine((values, context) => {
    const { options } = values;
    const issue = (path: (string | number)[], message: string) =>
      context.addIssue({ code: "custom", path, message });
    if (options.idColumn && options.idColumn === options.labelColumn) {
      issue(["options", "idColumn"], "The id column cannot also be the label.");
    }
    if (values.layoutSource === "column") {
      if (!options.shardColumn) {
        issue(["options", "shardColumn"], "Choose the column that names each row's shard.");
      } else if ([options.labelColumn, options.idColumn].includes(options.shardColumn)) {
        issue(["options", "shardColumn"], "The shard column cannot also be the label or id.");
      }
    } else if (!values.layoutFileId) {
      issue(["layoutFileId"], "Upload or choose a partition map.");
    }
    if (options.features.length === 0) {
      issue(["options", "features"], "Choose at least one feature column.");
    }
    if (values.referenceSource === "weights" && !values.weightsFileId) {
      issue(["weightsFileId"], "Upload or choose a reference weights file.");
    }
    if (values.participantsMode === "sample") {
      const participants = options.participants ?? Number.NaN;
      if (!Number.isInteger(participants) || participants < 1) {
        issue(["options", "participants"], "Enter how many shards take part in each round.");
      }
    }
    if (options.simulate.enabled) {
      const seeds = simulationSeeds.safeParse(options.simulate.seeds);
      if (!seeds.success) issue(["options", "simulate", "seeds"], seeds.error.issues[0].message);
    }
    // Whatever the server will check, checked here too, on the same paths.
    const request = startAnalysisSchema.safeParse(toStartAnalysisInput(values));
    if (!request.success) {
      for (const problem of request.error.issues) {
        issue(
          problem.path.map((part) => (typeof part === "symbol" ? String(part) : part)),
          problem.message,
        );
      }
    }
  });

export type AnalysisFormValues = z.input<typeof analysisFormSchema>;

/** The request the form's values stand for. */
export function toStartAnalysisInput(values: AnalysisFormValues): StartAnalysisInput {
  const { options } = values;
  const byColumn = values.layoutSource === "column";
  return {
    title: values.title.trim() || undefined,
    datasetFileId: values.datasetFileId,
    layoutFileId: byColumn ? undefined : values.layoutFileId || undefined,
    weightsFileId: values.referenceSource === "weights" ? values.weightsFileId : undefined,
    previousReportId: values.previousReportId || undefined,
    options: {
      labelColumn: options.labelColumn,
      idColumn: options.idColumn || undefined,
      shardColumn: byColumn ? options.shardColumn || undefined : undefined,
      features: options.features,
      task: options.task === "auto" ? undefined : options.task,
      lambda: options.lambda,
      // Uploaded weights travel as a file; the worker reads them in place of this reference.
      reference: values.referenceSource === "zero" ? "zero" : "optimum",
      participants: values.participantsMode === "sample" ? options.participants : undefined,
      localSteps: options.localSteps,
      rounds: options.rounds,
      batchSize: options.batchSize,
      dropUnassignedRows: byColumn ? false : options.dropUnassignedRows,
      encoding: options.encoding,
      // Left out when detected: the engine detects them as the preview did (and reads in parallel).
      delimiter: options.delimiter || undefined,
      decimalMark: options.decimalMark || undefined,
      badNumbersAsMissing: options.badNumbersAsMissing,
      // The server's default budget and grid seed apply.
      simulate: options.simulate.enabled ? { seeds: options.simulate.seeds } : undefined,
    },
  };
}

/** A fresh form: nothing chosen, the plan at methods.md's defaults. */
export const EMPTY_FORM: AnalysisFormValues = {
  title: "",
  datasetFileId: "",
  layoutSource: "column",
  layoutFileId: "",
  referenceSource: "optimum",
  weightsFileId: "",
  participantsMode: "all",
  previousReportId: "",
  options: {
    labelColumn: "",
    idColumn: "",
    shardColumn: "",
    features: [],
    task: "auto",
    lambda: PLAN_DEFAULTS.lambda,
    participants: undefined,
    localSteps: PLAN_DEFAULTS.localSteps,
    rounds: PLAN_DEFAULTS.rounds,
    batchSize: PLAN_DEFAULTS.batchSize,
    dropUnassignedRows: false,
    encoding: "utf-8",
    delimiter: "",
    decimalMark: "",
    badNumbersAsMissing: false,
    simulate: { enabled: false, seeds: DEFAULT_SIMULATION_SEEDS },
  },
};

/** What an earlier analysis used, as the form's values, for "run again" and revisions. */
export interface SavedAnalysis {
  title: string;
  datasetFileId: string;
  layoutFileId: string | null;
  weightsFileId: string | null;
  parameters: AnalysisOptionsInput;
}

/**
 * The form filled in from an earlier analysis. Features it left to the default stay empty here,
 * so the form picks the default for the dataset.
 */
export function formValuesFrom(
  saved: SavedAnalysis,
  previousReportId?: string,
): AnalysisFormValues {
  const options = saved.parameters;
  return {
    ...EMPTY_FORM,
    title: saved.title,
    datasetFileId: saved.datasetFileId,
    layoutSource: saved.layoutFileId ? "file" : "column",
    layoutFileId: saved.layoutFileId ?? "",
    referenceSource: saved.weightsFileId
      ? "weights"
      : options.reference === "zero"
        ? "zero"
        : "optimum",
    weightsFileId: saved.weightsFileId ?? "",
    participantsMode: options.participants === undefined ? "all" : "sample",
    previousReportId: previousReportId ?? "",
    options: {
      labelColumn: options.labelColumn,
      idColumn: options.idColumn ?? "",
      shardColumn: options.shardColumn ?? "",
      features: options.features ?? [],
      task: options.task ?? "auto",
      lambda: options.lambda ?? PLAN_DEFAULTS.lambda,
      participants: options.participants,
      localSteps: options.localSteps ?? PLAN_DEFAULTS.localSteps,
      rounds: options.rounds ?? PLAN_DEFAULTS.rounds,
      batchSize: options.batchSize ?? PLAN_DEFAULTS.batchSize,
      dropUnassignedRows: options.dropUnassignedRows ?? false,
      encoding: options.encoding ?? "utf-8",
      delimiter: options.delimiter ?? "",
      decimalMark: options.decimalMark ?? "",
      badNumbersAsMissing: options.badNumbersAsMissing ?? false,
      simulate: {
        enabled: options.simulate !== undefined,
        seeds: options.simulate?.seeds ?? DEFAULT_SIMULATION_SEEDS,
      },
    },
  };
}

/** The columns the form's choices use for another role than a feature. */
export function reservedColumns(values: AnalysisFormValues) {
  const { labelColumn, idColumn, shardColumn } = values.options;
  return {
    labelColumn,
    idColumn,
    shardColumn: values.layoutSource === "column" ? shardColumn : "",
  };
}

/** Columns a feature may come from: all but the label, id and shard columns. */
export function usableFeatures(
  columns: string[],
  reserved: { labelColumn: string; idColumn: string; shardColumn: string },
): string[] {
  const taken = new Set([reserved.labelColumn, reserved.idColumn, reserved.shardColumn]);
  return columns.filter((column) => !taken.has(column));
}

/** Values with the default features filled in when none are named (a re-run that used them). */
export function withDefaultFeatures(
  values: AnalysisFormValues,
  columns: string[],
): AnalysisFormValues {
  if (values.options.features.length > 0) return values;
  const features = usableFeatures(columns, reservedColumns(values));
  return { ...values, options: { ...values.options, features } };
}
