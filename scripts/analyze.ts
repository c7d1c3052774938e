/**
 * `npm run analyze -- --data FILE --label COL (--partition FILE | --shard-column COL) …`
 * Runs the analysis engine on local files, or with `--server URL --token T` on a Partita server
 * through its API (lib/cli/server-run.ts): the JSON summary (methods.md §6) goes to --out or stdout,
 * a short human summary and progress go to stderr. `--fail-on RULE` (repeatable, lib/cli/fail-on.ts)
 * gates on the summary. `--simulate` also runs methods.md §7's simulation of the plan (progress by
 * run on stderr). Exit 0 on success, 3 when a --fail-on rule is crossed, 2 on bad input (the
 * message names file, row, column and what was expected; also a malformed rule or a request the
 * server refused), 1 on an internal error (stack only with DEBUG set).
 */
import { writeFileSync } from "node:fs";
import { parseArgs } from "node:util";
import {
  analyzePartition,
  AnalysisInputError,
  readMemorySettings,
  type PartitionSummary,
  type SimulationProgress,
} from "../lib/analysis";
import { ServerError } from "../lib/cli/api-client";
import {
  checkFailOnRules,
  describeCrossedRules,
  FailOnRuleError,
  parseFailOnRule,
} from "../lib/cli/fail-on";
import {
  DATA_FLAGS,
  PLAN_FLAGS,
  readFeatures,
  readNumber,
  readPlanFlags,
  readReference,
  readTask,
  readTextFormatFlags,
  requireReadableFile,
  attachDashedValues,
  describeInputError,
  TEXT_FORMAT_FLAGS,
  TEXT_FORMAT_USAGE,
} from "../lib/cli/analysis-flags";
import { createProgressPrinter } from "../lib/cli/progress-lines";
import { EXIT_BAD_INPUT, EXIT_INTERNAL, runCommand } from "../lib/cli/run-command";
import { runOnServer, ServerAnalysisError } from "../lib/cli/server-run";
import type { AnalysisOptionsInput } from "../lib/validation/analysis-options";

const USAGE = `usage: npm run analyze -- --data FILE --label COL (--partition FILE | --shard-column COL)
  [--id-column COL] [--features a,b,…] [--task classification|regression] [--lambda X]
  [--reference optimum|zero|FILE.json] [--participants M] [--local-steps K] [--rounds R]
  [--batch-size b] [--out FILE] [--server URL [--token T]] [--fail-on RULE]…
  [--simulate [--seeds S] [--seed N] [--budget MULTIPLY_ADDS]]
  [--memory-limit SIZE] [--scratch-dir DIR]
  ${TEXT_FORMAT_USAGE}
  --memory-limit (default $PARTITA_MEMORY_LIMIT, else 2G): encoded rows beyond it go to a
  scratch file in --scratch-dir (default $PARTITA_SCRATCH_DIR, else the temporary folder)
  --token defaults to $PARTITA_API_TOKEN; RULE is KEY OP VALUE, e.g. 'js>0.1' or verdict!=local-updates`;

const EXIT_RULE_CROSSED = 3;

/** Runs the analysis and answers the exit code: 0, or 3 when a --fail-on rule is crossed. */
async function main(): Promise<number> {
  const { flags, failOn, simulate, switches } = readFlags(process.argv.slice(2));
  const rules = failOn.map(parseFailOnRule);
  const dataSize = requireReadableFile(flags.data, "--data");
  if (flags.partition !== undefined) requireReadableFile(flags.partition, "--partition");
  const options: AnalysisOptionsInput = {
    labelColumn: flags.label,
    idColumn: flags["id-column"],
    shardColumn: flags["shard-column"],
    features: readFeatures(flags.features),
    task: readTask(flags.task),
    // On a server, given weights travel as an uploaded file (readWeightsPath) instead.
    reference:
      flags.server && isWeightsFile(flags.reference) ? undefined : readReference(flags.reference),
    ...readPlanFlags(flags),
    ...readTextFormatFlags(switches),
    simulate: simulate
      ? {
          seeds: readNumber(flags.seeds, "--seeds"),
          seed: readNumber(flags.seed, "--seed"),
          budget: readNumber(flags.budget, "--budget"),
        }
      : undefined,
  };
  const json = flags.server
    ? await runOnServer({
        server: flags.server,
        token: readToken(flags.token),
        dataPath: flags.data,
        partitionPath: flags.partition,
        weightsPath: readWeightsPath(flags.reference),
        options,
        onProgress: createProgressPrinter(),
        onSimulationProgress: createSimulationProgressPrinter(),
        onAnalysisStarted: ({ id }) =>
          process.stderr.write(`partita: analysis ${id} started on ${flags.server}\n`),
        onReportStored: ({ id, url }) => process.stderr.write(`partita: report ${id}: ${url}\n`),
      })
    : await analyzeLocally(flags, options, dataSize);
  if (flags.out) writeFileSync(flags.out, json);
  else process.stdout.write(json);
  const summary = JSON.parse(json) as PartitionSummary;
  process.stderr.write(describeSummary(summary));
  const crossed = describeCrossedRules(checkFailOnRules(summary, rules));
  if (!crossed) return 0;
  process.stderr.write(crossed);
  return EXIT_RULE_CROSSED;
}

async function analyzeLocally(
  flags: Flags,
  options: AnalysisOptionsInput,
  dataSize: number,
): Promise<string> {
  const summary = await analyzePartition(
    {
      data: { path: flags.data },
      dataName: flags.data,
      dataBytes: dataSize,
      partition: flags.partition ? { path: flags.partition } : undefined,
      partitionName: flags.partition,
      referenceName: flags.reference,
      options,
      memory: {
        ...readMemorySettings(process.env, {
          memoryLimit: flags["memory-limit"],
          scratchDirectory: flags["scratch-dir"],
        }),
        onScratchFile: (file) =>
          process.stderr.write(
            `partita: rows beyond the memory limit go to scratch file ${file} (unlinked at once, freed at exit)\n`,
          ),
      },
      onSimulationProgress: createSimulationProgressPrinter(),
    },
    createProgressPrinter(),
  );
  return `${JSON.stringify(summary, null, 2)}\n`;
}

/** A token on the command line shows in process lists, so the environment is offered too. */
function readToken(value: string | undefined): string {
  const token = value ?? process.env.PARTITA_API_TOKEN;
  if (!token) {
    throw new AnalysisInputError(`--server needs --token T or PARTITA_API_TOKEN\n${USAGE}`);
  }
  return token;
}

function isWeightsFile(value: string | undefined): value is string {
  return value !== undefined && value !== "optimum" && value !== "zero";
}

/** On a server, given weights are uploaded as a file, checked here first as a local run would. */
function readWeightsPath(value: string | undefined): string | undefined {
  if (!isWeightsFile(value)) return undefined;
  readReference(value);
  return value;
}

type Flags = { data: string; label: string } & Partial<Record<string, string>>;

function readFlags(argv: string[]): {
  flags: Flags;
  failOn: string[];
  simulate: boolean;
  /** The string flags and switches together, for readers that take both. */
  switches: Partial<Record<string, string | boolean>>;
} {
  const text = { type: "string" } as const;
  let values: Partial<Record<string, string | string[] | boolean>>;
  try {
    values = parseArgs({
      args: attachDashedValues(argv),
      options: {
        ...DATA_FLAGS,
        ...TEXT_FORMAT_FLAGS,
        ...PLAN_FLAGS,
        reference: text,
        out: text,
        server: text,
        token: text,
        "fail-on": { type: "string", multiple: true },
        simulate: { type: "boolean" },
        seeds: text,
        seed: text,
        budget: text,
        "memory-limit": text,
        "scratch-dir": text,
      },
      strict: true,
      allowPositionals: false,
    }).values;
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
  const simulate = values.simulate === true;
  const simulationFlag = ["seeds", "seed", "budget"].find((name) => values[name] !== undefined);
  if (!simulate && simulationFlag !== undefined) {
    throw new AnalysisInputError(`--${simulationFlag} only applies with --simulate\n${USAGE}`);
  }
  const { "fail-on": failOn = [], ...single } = values;
  const switches = { ...single } as Partial<Record<string, string | boolean>>;
  // Switches, not string flags.
  delete single.simulate;
  delete single["bad-numbers-as-missing"];
  return { flags: single as Flags, failOn: failOn as string[], simulate, switches };
}

/** One line per simulation run (3 × (8 + S) runs, a few more when a grid is extended), not per round. */
function createSimulationProgressPrinter(): (progress: SimulationProgress) => void {
  let lastRun = 0;
  return ({ algorithm, phase, run, runs }) => {
    if (run === lastRun) return;
    lastRun = run;
    const what = phase === "step-size" ? "step-size search" : "seeds";
    process.stderr.write(`partita: simulating run ${run}/${runs} (${algorithm}, ${what})\n`);
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
    ...describeSimulation(summary.simulation),
    ...summary.preprocessing.warnings.map((warning) => `warning: ${warning}`),
  ];
  return `${lines.join("\n")}\n`;
}

function describeSimulation(simulation: PartitionSummary["simulation"]): string[] {
  if (!simulation) return [];
  const format = (value: number | null) => (value === null ? "n/a" : value.toPrecision(3));
  return [
    `simulation (${simulation.seeds} seeds): ` +
      simulation.algorithms
        .map((algorithm) => `${algorithm.name} F−F* ${format(algorithm.final)}`)
        .join(", ") +
      ` → ${simulation.verdict}`,
    simulation.note,
  ];
}

runCommand(main, (error) => {
  if (error instanceof AnalysisInputError || error instanceof FailOnRuleError) {
    return { line: `bad input: ${describeInputError(error)}`, exitCode: EXIT_BAD_INPUT };
  }
  if (error instanceof ServerError && error.status < 500) {
    return {
      line: `the server refused (${error.code}): ${error.message}`,
      exitCode: EXIT_BAD_INPUT,
    };
  }
  if (error instanceof ServerAnalysisError) {
    return { line: `the analysis failed on the server: ${error.message}`, exitCode: EXIT_INTERNAL };
  }
  return undefined;
});
