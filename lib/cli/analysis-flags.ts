import { readFileSync, statSync } from "node:fs";
import { AnalysisInputError } from "../analysis";
import { DECIMAL_MARKS, DELIMITERS, quoteValue, TEXT_ENCODINGS } from "../analysis";
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

/**
 * parseArgs specs of how the dataset's text is read (methods.md §1); the analyze command's own
 * (the digest command's --encoding names its encoding file).
 */
export const TEXT_FORMAT_FLAGS = {
  encoding: text,
  delimiter: text,
  "decimal-mark": text,
  "bad-numbers-as-missing": { type: "boolean" },
} as const;

/** Usage lines of the data flags that say how a text file is read (methods.md §1). */
export const TEXT_FORMAT_USAGE = `[--encoding utf-8|windows-1252|utf-16] [--delimiter ,|;|tab] [--decimal-mark .|,]
  [--bad-numbers-as-missing]`;

/** parseArgs specs of the model and plan flags (methods.md §2 and §5). */
export const PLAN_FLAGS = {
  lambda: text,
  participants: text,
  "local-steps": text,
  rounds: text,
  "batch-size": text,
} as const;

type FlagValues = Partial<Record<string, string>>;

/**
 * How the dataset's text is read and whether bad values in a numeric column count as missing
 * (methods.md §1): --encoding, --delimiter (",", ";" or "tab"), --decimal-mark, --bad-numbers-as-missing.
 */
export function readTextFormatFlags(flags: Partial<Record<string, string | boolean>>) {
  const delimiter = flags.delimiter === "tab" ? "\t" : flags.delimiter;
  return {
    encoding: readChoice(flags.encoding, "--encoding", TEXT_ENCODINGS),
    delimiter: readChoice(delimiter, "--delimiter", DELIMITERS),
    decimalMark: readChoice(flags["decimal-mark"], "--decimal-mark", DECIMAL_MARKS),
    badNumbersAsMissing: flags["bad-numbers-as-missing"] === true,
  };
}

function readChoice<T extends string>(
  value: string | boolean | undefined,
  flag: string,
  choices: readonly T[],
): T | undefined {
  if (value === undefined) return undefined;
  if (typeof value === "string" && (choices as readonly string[]).includes(value))
    return value as T;
  throw new AnalysisInputError(`${flag} is ${quoteValue(String(value))}`, {
    expected: `one of ${choices.map((choice) => (choice === "\t" ? "tab" : quoteValue(choice))).join(", ")}`,
  });
}

/** Flags that take a value; a value that starts with a dash ("-5") is still theirs. */
const NUMBER_FLAGS = new Set([
  "--lambda",
  "--participants",
  "--local-steps",
  "--rounds",
  "--batch-size",
  "--seeds",
  "--seed",
  "--budget",
]);

/**
 * Joins "--rounds -5" into "--rounds=-5": Node's parseArgs reads a value that starts with a dash
 * as the next option, and the user should hear that -5 is not a valid number of rounds instead.
 */
export function attachDashedValues(argv: string[]): string[] {
  const joined: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const next = argv[i + 1];
    if (NUMBER_FLAGS.has(argv[i]) && next !== undefined && /^-[\d.]/.test(next)) {
      joined.push(`${argv[i]}=${next}`);
      i++;
    } else {
      joined.push(argv[i]);
    }
  }
  return joined;
}

/** The command-line flag of each analysis option, so an option's error names what the user typed. */
const FLAG_OF_OPTION: Record<string, string> = {
  labelColumn: "--label",
  idColumn: "--id-column",
  shardColumn: "--shard-column",
  features: "--features",
  task: "--task",
  lambda: "--lambda",
  reference: "--reference",
  participants: "--participants",
  localSteps: "--local-steps",
  rounds: "--rounds",
  batchSize: "--batch-size",
  encoding: "--encoding",
  delimiter: "--delimiter",
  decimalMark: "--decimal-mark",
  "simulate.seeds": "--seeds",
  "simulate.seed": "--seed",
  "simulate.budget": "--budget",
};

/** An input error's message, with an analysis option named by its flag ("--batch-size is 0 …"). */
export function describeInputError(error: Error): string {
  if (!(error instanceof AnalysisInputError) || error.option === undefined) return error.message;
  const flag = FLAG_OF_OPTION[error.option] ?? error.option;
  return `${flag} ${error.problem}${error.expected === undefined ? "" : ` (expected ${error.expected})`}`;
}

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
    throw new AnalysisInputError(`${flag}: cannot read ${quoteValue(path)}`, {
      file: path,
      expected: "an existing CSV, gzip-compressed CSV (.csv.gz) or Parquet file",
    });
  }
}

export function readNumber(value: string | undefined, flag: string): number | undefined {
  if (value === undefined) return undefined;
  const parsed = Number(value);
  if (value.trim() === "" || !Number.isFinite(parsed)) {
    throw new AnalysisInputError(`${flag} is ${quoteValue(value)}`, { expected: "a number" });
  }
  return parsed;
}

export function readTask(value: string | undefined): AnalysisOptionsInput["task"] {
  if (value === undefined || value === "classification" || value === "regression") return value;
  throw new AnalysisInputError(`--task is ${quoteValue(value)}`, {
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
