import { z } from "zod";
import {
  analysisOptionsSchema,
  referenceWeightsSchema,
  type ReferenceWeights,
} from "./analysis-options";

// The web form of a new federated analysis (methods.md §9). The browser and the server action
// check the same values with this schema, then the server checks the request it stands for
// (createFederatedAnalysisSchema). The plan and reference fields carry the file analysis form's
// own names (options.localSteps, participantsMode, referenceSource, …) so its fields serve both.

/** The file analysis's defaults (λ, K, R, b), read from its own schema: one definition. */
const ANALYSIS_DEFAULTS = analysisOptionsSchema.parse({ labelColumn: "label" });

const wholeNumber = (what: string) =>
  z
    .number({ message: `Enter the ${what} as a whole number.` })
    .int(`Enter the ${what} as a whole number.`)
    .min(1, `The ${what} must be at least 1.`);

export const federatedFormSchema = z
  .object({
    title: z
      .string()
      .trim()
      .min(1, "Give the analysis a title.")
      .max(200, "Keep the title under 200 characters."),
    /** Expected clients, one per line. */
    clientsText: z.string(),
    referenceSource: z.enum(["optimum", "zero", "weights"]),
    /** The weights read from the uploaded file, and its name (kept across failed submits). */
    weights: referenceWeightsSchema.nullable(),
    weightsFileName: z.string(),
    participantsMode: z.enum(["all", "sample"]),
    minimumShardRows: wholeNumber("minimum rows per shard"),
    /** The report this analysis revises (its next version), or "" for a new report. */
    previousReportId: z.string(),
    options: z.object({
      labelColumn: z.string().trim().min(1, "Name the column that holds the label."),
      /** Feature columns separated by commas or new lines; empty: all but label, id and shard. */
      featuresText: z.string(),
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
    }),
  })
  .superRefine((values, context) => {
    const issue = (path: string[], message: string) =>
      context.addIssue({ code: "custom", path, message });
    const clients = splitClients(values.clientsText);
    if (clients.length === 0) issue(["clientsText"], "Name at least one expected client.");
    const twice = clients.find((name, index) => clients.indexOf(name) !== index);
    if (twice !== undefined) issue(["clientsText"], `“${twice}” is named twice.`);
    const tooLong = clients.find((name) => name.length > 80);
    if (tooLong !== undefined) {
      issue(
        ["clientsText"],
        `Keep a client's name under 80 characters (“${tooLong.slice(0, 20)}…”).`,
      );
    }
    const features = splitFeatures(values.options.featuresText);
    const repeated = features.find((name, index) => features.indexOf(name) !== index);
    if (repeated !== undefined) issue(["options", "featuresText"], `“${repeated}” is named twice.`);
    if (features.includes(values.options.labelColumn.trim())) {
      issue(["options", "featuresText"], "The label column cannot also be a feature.");
    }
    if (values.referenceSource === "weights" && values.weights === null) {
      issue(["weights"], "Upload the reference weights (a JSON file).");
    }
    if (values.participantsMode === "sample") {
      const participants = values.options.participants ?? Number.NaN;
      if (!Number.isInteger(participants) || participants < 1) {
        issue(["options", "participants"], "Enter how many shards take part in each round.");
      }
    }
  });

export type FederatedFormValues = z.input<typeof federatedFormSchema>;

/** Client names, one a line; blank lines are ignored. */
export function splitClients(text: string): string[] {
  return text
    .split(/\r?\n/)
    .map((line) => line.trim())
    .filter((line) => line.length > 0);
}

/** Feature columns separated by commas or new lines. */
export function splitFeatures(text: string): string[] {
  return text
    .split(/[,\r\n]/)
    .map((name) => name.trim())
    .filter((name) => name.length > 0);
}

/** The request (createFederatedAnalysisSchema's input) that the form's values stand for. */
export function toFederatedRequest(values: FederatedFormValues) {
  const { options } = values;
  const features = splitFeatures(options.featuresText);
  return {
    title: values.title.trim(),
    labelColumn: options.labelColumn.trim(),
    features: features.length > 0 ? features : undefined,
    task: options.task === "auto" ? undefined : options.task,
    lambda: options.lambda,
    reference:
      values.referenceSource === "weights" && values.weights !== null
        ? values.weights
        : values.referenceSource === "zero"
          ? ("zero" as const)
          : ("optimum" as const),
    participants: values.participantsMode === "sample" ? options.participants : undefined,
    localSteps: options.localSteps,
    rounds: options.rounds,
    batchSize: options.batchSize,
    clients: splitClients(values.clientsText),
    minimumShardRows: values.minimumShardRows,
    previousReportId: values.previousReportId || undefined,
  };
}

/** Where the request's field errors show on the form (request path → form path). */
const FORM_PATHS: Record<string, string> = {
  title: "title",
  labelColumn: "options.labelColumn",
  features: "options.featuresText",
  task: "options.task",
  lambda: "options.lambda",
  reference: "weights",
  participants: "options.participants",
  localSteps: "options.localSteps",
  rounds: "options.rounds",
  batchSize: "options.batchSize",
  clients: "clientsText",
  minimumShardRows: "minimumShardRows",
};

/** A request field error's form path (clients.3 → clientsText); null when no field shows it. */
export function formPathOf(requestPath: string): string | null {
  return FORM_PATHS[requestPath.split(".")[0]] ?? null;
}

/** A fresh form: the file analysis's defaults and methods.md §9's minimum shard rows. */
export function emptyFederatedForm(minimumShardRows: number): FederatedFormValues {
  return {
    title: "",
    clientsText: "",
    referenceSource: "optimum",
    weights: null,
    weightsFileName: "",
    participantsMode: "all",
    minimumShardRows,
    previousReportId: "",
    options: {
      labelColumn: "",
      featuresText: "",
      task: "auto",
      lambda: ANALYSIS_DEFAULTS.lambda,
      participants: undefined,
      localSteps: ANALYSIS_DEFAULTS.localSteps,
      rounds: ANALYSIS_DEFAULTS.rounds,
      batchSize: ANALYSIS_DEFAULTS.batchSize,
    },
  };
}

/** What "run again" takes over from the analysis that made a report. */
export type FederatedPlanToRevise = {
  title: string;
  labelColumn: string;
  features: string[] | null;
  task: "classification" | "regression" | null;
  lambda: number;
  reference: "optimum" | "zero" | ReferenceWeights;
  plan: { participants?: number; localSteps: number; rounds: number; batchSize: number };
  minimumShardRows: number;
  clients: string[];
};

/**
 * The form filled in from the federated analysis behind a report: the same options, reference,
 * plan and roster, as the report's next version. Clients send their digests again (nothing of
 * the earlier rounds is reused: the data may have changed).
 */
export function federatedFormFrom(
  earlier: FederatedPlanToRevise,
  previousReportId: string,
): FederatedFormValues {
  const { reference, plan } = earlier;
  return {
    title: earlier.title,
    clientsText: earlier.clients.join("\n"),
    referenceSource: reference === "optimum" || reference === "zero" ? reference : "weights",
    weights: reference === "optimum" || reference === "zero" ? null : reference,
    weightsFileName:
      reference === "optimum" || reference === "zero" ? "" : "the earlier analysis's weights",
    participantsMode: plan.participants === undefined ? "all" : "sample",
    minimumShardRows: earlier.minimumShardRows,
    previousReportId,
    options: {
      labelColumn: earlier.labelColumn,
      featuresText: earlier.features?.join(", ") ?? "",
      task: earlier.task ?? "auto",
      lambda: earlier.lambda,
      participants: plan.participants,
      localSteps: plan.localSteps,
      rounds: plan.rounds,
      batchSize: plan.batchSize,
    },
  };
}
