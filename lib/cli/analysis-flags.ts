import { readFileSync, statSync } from "node:fs";
import { AnalysisInputError } from "../analysis";
import {
  referenceWeightsSchema,
  type AnalysisOptionsInput,
  type ReferenceWeights,
} from "../validation/analysis-options";

/**
 * Flag readers shared by the command lines (`npm run analyze`, `npm run digest`): each turns one
 * flag's text into an option or an AnalysisInputError that names the flag and what it expects.
 */

const text = { type: "string" } as const;

/** parseArgs specs of the data flags: where the rows are and which columns they use. */
export const DATA_FLAGS = {
  data: text,
  label: text,
  partition: text,
  "shard-column": text,
  "id-column": text,
  features: text,
  task: text,
} as const;

/** parseArgs specs of the model and plan flags (methods.md §2 and §5). */
export const PLAN_FLAGS = {
  lambda: text,
  participants: text,
  "local-steps": text,
  rounds: text,
  "batch-size": text,
} as const;

type FlagValues = Partial<Record<string, string>>;

/** The feature list of --features a,b,…. */
export function readFeatures(value: string | undefined): string[] | undefined {
  return value?.split(",").map((name) => name.trim());
}

/** λ and the plan (M, K, R, b) from the plan flags; absent flags keep their defaults. */
export function readPlanFlags(flags: FlagValues) {
  return {
    lambda: readNumber(flags.lambda, "--lambda"),
    participants: readNumber(flags.participants, "--participants"),
    localSteps: readNumber(flags["local-steps"], "--local-steps"),
    rounds: readNumber(flags.rounds, "--rounds"),
    batchSize: readNumber(flags["batch-size"], "--batch-size"),
  };
}

/** The size of a readable file, or an error naming the flag. */
export function requireReadableFile(path: string, flag: string): number {
  try {
    const stats = statSync(path);
    if (!stats.isFile()) throw new Error("not a file");
    return stats.size;
  } catch {
    throw new AnalysisInputError(`${flag}: cannot read "${path}"`, {
      file: path,
      expected: "an existing CSV, gzip-compressed CSV (.csv.gz) or Parquet file",
    });
  }
}

export function readNumber(value: string | undefined, flag: string): number | undefined {
  if (value === undefined) return undefined;
  const parsed = Number(value);
  if (value.trim() === "" || !Number.isFinite(parsed)) {
    throw new AnalysisInputError(`${flag} is "${value}"`, { expected: "a number" });
  }
  return parsed;
}

export function readTask(value: string | undefined): AnalysisOptionsInput["task"] {
  if (value === undefined || value === "classification" || value === "regression") return value;
  throw new AnalysisInputError(`--task is "${value}"`, {
    expected: "classification or regression",
  });
}

/** optimum, zero, or a JSON file of weights (checked against the weights' schema). */
export function readReference(value: string | undefined): AnalysisOptionsInput["reference"] {
  if (value === undefined || value === "optimum" || value === "zero") return value;
  let parsed: unknown;
  try {
    parsed = JSON.parse(readFileSync(value, "utf8"));
  } catch (error) {
    throw new AnalysisInputError(`cannot read the reference weights: ${(error as Error).message}`, {
      file: value,
      expected: "optimum, zero, or a JSON file of weights",
    });
  }
  const weights = referenceWeightsSchema.safeParse(parsed);
  if (!weights.success) {
    const issue = weights.error.issues[0];
    throw new AnalysisInputError(`the reference weights are malformed: ${issue.message}`, {
      file: value,
      column: issue.path.join(".") || undefined,
      expected: '{ "classes": [...] | null, "features": [...], "weights": [[...], ...] }',
    });
  }
  return weights.data satisfies ReferenceWeights;
}
