/**
 * `npm run analyze -- --data FILE --label COL (--partition FILE | --shard-column COL) …`
 * Runs the analysis engine on local files: the JSON summary (methods.md §6) goes to --out or stdout,
 * a short human summary and progress go to stderr. Exit 0 on success, 2 on bad input (the message
 * names file, row, column and what was expected), 1 on an internal error (stack only with DEBUG set).
 */
import { createReadStream, readFileSync, statSync, writeFileSync } from "node:fs";
import { parseArgs } from "node:util";
import { analyzePartition, AnalysisInputError, type PartitionSummary } from "../lib/analysis";
import type { AnalysisProgress } from "../lib/analysis/summary";
import {
  referenceWeightsSchema,
  type AnalysisOptionsInput,
  type ReferenceWeights,
} from "../lib/validation/analysis-options";

const USAGE = `usage: npm run analyze -- --data FILE --label COL (--partition FILE | --shard-column COL)
  [--id-column COL] [--features a,b,…] [--task classification|regression] [--lambda X]
  [--reference optimum|zero|FILE.json] [--participants M] [--local-steps K] [--rounds R]
  [--batch-size b] [--out FILE]`;

const EXIT_BAD_INPUT = 2;
const EXIT_INTERNAL = 1;

async function main(): Promise<void> {
  const flags = readFlags(process.argv.slice(2));
  const dataSize = requireReadableFile(flags.data, "--data");
  if (flags.partition !== undefined) requireReadableFile(flags.partition, "--partition");
  const options: AnalysisOptionsInput = {
    labelColumn: flags.label,
    idColumn: flags["id-column"],
    shardColumn: flags["shard-column"],
    features: flags.features?.split(",").map((name) => name.trim()),
    task: readTask(flags.task),
    lambda: readNumber(flags.lambda, "--lambda"),
    reference: readReference(flags.reference),
    participants: readNumber(flags.participants, "--participants"),
    localSteps: readNumber(flags["local-steps"], "--local-steps"),
    rounds: readNumber(flags.rounds, "--rounds"),
    batchSize: readNumber(flags["batch-size"], "--batch-size"),
  };
  const summary = await analyzePartition(
    {
      data: createReadStream(flags.data),
      dataName: flags.data,
      dataBytes: dataSize,
      partition: flags.partition ? createReadStream(flags.partition) : undefined,
      partitionName: flags.partition,
      referenceName: flags.reference,
      options,
    },
    createProgressPrinter(),
  );
  const json = `${JSON.stringify(summary, null, 2)}\n`;
  if (flags.out) writeFileSync(flags.out, json);
  else process.stdout.write(json);
  process.stderr.write(describeSummary(summary));
}

type Flags = { data: string; label: string } & Partial<Record<string, string>>;

function readFlags(argv: string[]): Flags {
  const text = { type: "string" } as const;
  let values: Partial<Record<string, string>>;
  try {
    values = parseArgs({
      args: argv,
      options: {
        data: text,
        label: text,
        partition: text,
        "shard-column": text,
        "id-column": text,
        features: text,
        task: text,
        lambda: text,
        reference: text,
        participants: text,
        "local-steps": text,
        rounds: text,
        "batch-size": text,
        out: text,
      },
      strict: true,
      allowPositionals: false,
    }).values as Partial<Record<string, string>>;
  } catch (error) {
    throw new AnalysisInputError(`${(error as Error).message}\n${USAGE}`);
  }
  if (!values.data || !values.label) {
    throw new AnalysisInputError(`--data and --label are required\n${USAGE}`);
  }
  if ((values.partition === undefined) === (values["shard-column"] === undefined)) {
    throw new AnalysisInputError(
      `give exactly one of --partition FILE and --shard-column COL\n${USAGE}`,
    );
  }
  return values as Flags;
}

function requireReadableFile(path: string, flag: string): number {
  try {
    const stats = statSync(path);
    if (!stats.isFile()) throw new Error("not a file");
    return stats.size;
  } catch {
    throw new AnalysisInputError(`${flag}: cannot read "${path}"`, {
      file: path,
      expected: "an existing CSV file",
    });
  }
}

function readNumber(value: string | undefined, flag: string): number | undefined {
  if (value === undefined) return undefined;
  const parsed = Number(value);
  if (value.trim() === "" || !Number.isFinite(parsed)) {
    throw new AnalysisInputError(`${flag} is "${value}"`, { expected: "a number" });
  }
  return parsed;
}

function readTask(value: string | undefined): AnalysisOptionsInput["task"] {
  if (value === undefined || value === "classification" || value === "regression") return value;
  throw new AnalysisInputError(`--task is "${value}"`, {
    expected: "classification or regression",
  });
}

function readReference(value: string | undefined): AnalysisOptionsInput["reference"] {
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

function createProgressPrinter(): (progress: AnalysisProgress) => void {
  let lastStage = "";
  let lastQuarter = -1;
  return ({ stage, fraction }) => {
    const quarter = Math.floor(fraction * 4);
    if (stage === lastStage && quarter === lastQuarter) return;
    lastStage = stage;
    lastQuarter = quarter;
    process.stderr.write(`partita: ${stage} ${Math.round(fraction * 100)}%\n`);
  };
}

function describeSummary(summary: PartitionSummary): string {
  const { dataset, advice, heterogeneity, labelSkew, model } = summary;
  const format = (value: number | null) => (value === null ? "n/a" : value.toPrecision(4));
  const lines = [
    `rows ${dataset.rows}, features ${dataset.features}, ${dataset.task}` +
      (dataset.classes !== null ? ` (${dataset.classes} classes)` : "") +
      `, shards ${summary.shards.length}`,
    `reference ${model.reference}: F = ${format(model.loss)}, ‖∇F‖ = ${format(model.gradNorm)}, B = ${format(model.distance)}`,
    `ζ² ${format(heterogeneity.zeta2)} (max on path ${format(heterogeneity.zeta2Max)}), σ² ${format(heterogeneity.sigma2)}, H ${format(heterogeneity.smoothness)}`,
    `label skew: TV ${format(labelSkew.tv)}, Dirichlet α̂ ${format(labelSkew.dirichletAlpha)}`,
    `plan M=${advice.participants} K=${advice.localSteps} R=${advice.rounds} b=${advice.batchSize}: ` +
      `local/minibatch bound ratio ${format(advice.ratio)} → ${advice.verdict}` +
      (advice.heterogeneityBarrier ? " (heterogeneity barrier)" : ""),
    ...summary.preprocessing.warnings.map((warning) => `warning: ${warning}`),
  ];
  return `${lines.join("\n")}\n`;
}

// exitCode instead of process.exit(): exiting at once would cut off JSON still queued for a pipe.
main().then(
  () => {
    process.exitCode = 0;
  },
  (error: unknown) => {
    if (error instanceof AnalysisInputError) {
      process.stderr.write(`partita: bad input: ${error.message}\n`);
      process.exitCode = EXIT_BAD_INPUT;
      return;
    }
    const message = error instanceof Error ? error.message : String(error);
    process.stderr.write(`partita: internal error: ${message}\n`);
    if (process.env.DEBUG && error instanceof Error) process.stderr.write(`${error.stack}\n`);
    process.exitCode = EXIT_INTERNAL;
  },
);
