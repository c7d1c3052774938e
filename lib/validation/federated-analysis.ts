import { z } from "zod";
import { DEFAULT_MINIMUM_SHARD_ROWS } from "../analysis";
import { analysisOptionsSchema } from "./analysis-options";

/** How long a client key may live: a federated analysis's rounds take hours to days, not years. */
export const CLIENT_KEY_LIFETIME_DAYS = [1, 7, 30, 90] as const;
/** A client name is shown on the roster and in every message about its digests. */
const clientName = z
  .string()
  .trim()
  .min(1, "Name every client.")
  .max(80, "Keep a client's name under 80 characters.");

// The model and plan options are the file analysis's own (same defaults and checks); the data
// options (id, shard columns, text format) belong to each client's command line instead.
const option = analysisOptionsSchema.shape;
const analysisOptions = z.object({
  labelColumn: option.labelColumn,
  features: option.features,
  task: option.task,
  lambda: option.lambda,
  reference: option.reference,
  participants: option.participants,
  localSteps: option.localSteps,
  rounds: option.rounds,
  batchSize: option.batchSize,
});

/** The analyst's form and the API's body: a federated analysis and its expected clients. */
export const createFederatedAnalysisSchema = analysisOptions
  .extend({
    title: z
      .string()
      .trim()
      .min(1, "Give the analysis a title.")
      .max(200, "Keep the title under 200 characters."),
    clients: z
      .array(clientName)
      .min(1, "Name at least one expected client.")
      .max(1000, "At most 1000 clients.")
      .refine((names) => new Set(names).size === names.length, "A client is named twice."),
    minimumShardRows: z.number().int().min(1).default(DEFAULT_MINIMUM_SHARD_ROWS),
    /** A report of this workspace that this analysis revises (its next version). */
    previousReportId: z.string().min(1).optional(),
  })
  .refine(
    (options) => !options.features || new Set(options.features).size === options.features.length,
    { message: "a feature column is named twice", path: ["features"] },
  );

export type CreateFederatedAnalysisInput = z.input<typeof createFederatedAnalysisSchema>;
export type CreateFederatedAnalysis = z.output<typeof createFederatedAnalysisSchema>;

/** Issuing a client key: for which client of the roster, and for how long. */
export const issueClientKeySchema = z.object({
  client: clientName,
  lifetimeDays: z.coerce
    .number()
    .refine((days) => (CLIENT_KEY_LIFETIME_DAYS as readonly number[]).includes(days), {
      message: `Choose a lifetime of ${CLIENT_KEY_LIFETIME_DAYS.join(", ")} days.`,
    })
    .default(7),
});

export type IssueClientKeyInput = z.input<typeof issueClientKeySchema>;

/** A key just issued: shown once, with its client and expiry; only its hash is kept. */
export interface IssuedClientKey {
  key: string;
  keyId: string;
  client: string;
  expiresAt: Date;
}

/** A client's digest file uploaded by the analyst on its behalf (the roster page's form). */
export const digestUploadSchema = z.object({
  client: z.string().trim().min(1, "Choose the client whose file this is."),
  round: z.enum(["schema", "gradients"]),
  fileName: z.string().max(300),
  text: z.string().min(1, "The file is empty."),
});

export type DigestUploadInput = z.input<typeof digestUploadSchema>;
