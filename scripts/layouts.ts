/**
 * `npm run layouts -- --data FILE --label COL --shards M [--group COL] [--generators LIST] …
 * --out-dir DIR` — the layout planner (methods.md §8) on a local file: generates candidate
 * partition maps, scores each with the full analysis under the same options and plan, and writes
 * DIR/<name>.csv per candidate (e.g. dirichlet-0.5.csv, `row_id,shard`) and DIR/layouts.json, the
 * comparison ranked by ρ then weighted JS. A ranked table goes to stderr. Exit 0 when at least one
 * candidate was scored (failed ones are listed), 2 on bad input (unknown generator, M larger than
 * the rows or the groups, a group generator without --group, …), 1 on an internal error.
 */
import { mkdirSync, writeFileSync } from "node:fs";
import path from "node:path";
import { parseArgs } from "node:util";
import {
  AnalysisInputError,
  GENERATOR_FACTS,
  LAYOUT_GENERATORS,
  parseLayoutSpec,
  planLayouts,
  writeLayoutMap,
  type LayoutComparison,
  type LayoutPlanProgress,
} from "../lib/analysis";
import {
  DATA_FLAGS,
  PLAN_FLAGS,
  readFeatures,
  readNumber,
  readPlanFlags,
  readReference,
  readTask,
  requireReadableFile,
} from "../lib/cli/analysis-flags";
import { createProgressPrinter } from "../lib/cli/progress-lines";
import { EXIT_BAD_INPUT, EXIT_INTERNAL, runCommand } from "../lib/cli/run-command";

const USAGE = `usage: npm run layouts -- --data FILE --label COL --shards M --out-dir DIR
  [--group COL] [--id-column COL] [--features a,b,…] [--task classification|regression]
  [--generators LIST] [--seed N] [--lambda X] [--reference optimum|zero|FILE.json]
  [--participants M] [--local-steps K] [--rounds R] [--batch-size b]
LIST is comma-separated (default: iid, stratified, dirichlet at α = 0.5, 5 and 50, classes:2,
quantity:0.5, clusters; with --group also group-hash and group-balanced):
${LAYOUT_GENERATORS.map((name) => `  ${name.padEnd(15)}${GENERATOR_FACTS[name].models}`).join("\n")}
  dirichlet:A takes the total concentration α (dirichlet:beta=B: β per class, α = β·C);
  classes:K the classes per shard; quantity:B the concentration β of the shard sizes.`;

async function main(): Promise<number> {
  const flags = readFlags(process.argv.slice(2));
  const shardCount = readNumber(flags.shards, "--shards") as number;
  const dataBytes = requireReadableFile(flags.data, "--data");
  const specs = flags.generators
    ?.split(",")
    .filter((entry) => entry.trim() !== "")
    .map(parseLayoutSpec);
  const { comparison, rowIds, assignments } = await planLayouts({
    data: { path: flags.data },
    dataName: flags.data,
    dataBytes,
    options: {
      labelColumn: flags.label,
      idColumn: flags["id-column"],
      features: readFeatures(flags.features),
      task: readTask(flags.task),
      reference: readReference(flags.reference),
      ...readPlanFlags(flags),
    },
    groupColumn: flags.group,
    shardCount,
    specs,
    seed: readNumber(flags.seed, "--seed"),
    onProgress: createPlanProgressPrinter(),
  });

  const directory = flags["out-dir"];
  mkdirSync(directory, { recursive: true });
  for (const [name, assignment] of assignments) {
    writeFileSync(
      path.join(directory, `${name}.csv`),
      writeLayoutMap(rowIds, assignment, shardCount),
    );
  }
  writeFileSync(path.join(directory, "layouts.json"), `${JSON.stringify(comparison, null, 2)}\n`);
  process.stderr.write(describeComparison(comparison));
  if (comparison.layouts.length > 0) return 0;
  return comparison.failures.every((failure) => failure.badInput) ? EXIT_BAD_INPUT : EXIT_INTERNAL;
}

type Flags = { data: string; label: string; shards: string; "out-dir": string } & Partial<
  Record<string, string>
>;

function readFlags(argv: string[]): Flags {
  const text = { type: "string" } as const;
  let values: Partial<Record<string, string | boolean | string[]>>;
  try {
    values = parseArgs({
      args: argv,
      options: {
        // The data flags but the partition and shard column: the planner makes the shards.
        data: DATA_FLAGS.data,
        label: DATA_FLAGS.label,
        "id-column": DATA_FLAGS["id-column"],
        features: DATA_FLAGS.features,
        task: DATA_FLAGS.task,
        ...PLAN_FLAGS,
        reference: text,
        shards: text,
        group: text,
        generators: text,
        seed: text,
        "out-dir": text,
      },
      strict: true,
      allowPositionals: false,
    }).values;
  } catch (error) {
    throw new AnalysisInputError(`${(error as Error).message}\n${USAGE}`);
  }
  const missing = ["data", "label", "shards", "out-dir"].filter((name) => !values[name]);
  if (missing.length > 0) {
    throw new AnalysisInputError(
      `missing ${missing.map((name) => `--${name}`).join(", ")}\n${USAGE}`,
    );
  }
  return values as Flags;
}

function createPlanProgressPrinter(): (progress: LayoutPlanProgress) => void {
  const printStage = createProgressPrinter();
  const printers = new Map<string, ReturnType<typeof createProgressPrinter>>();
  return (progress) => {
    if (progress.stage !== "candidate") return printStage(progress);
    const { name, index, count, status, analysis } = progress;
    const label = `[${index + 1}/${count} ${name}] `;
    if (analysis) {
      if (!printers.has(name)) printers.set(name, createProgressPrinter(label));
      (printers.get(name) as ReturnType<typeof createProgressPrinter>)(analysis);
    } else if (status !== "running") {
      process.stderr.write(`partita: ${label}${status}\n`);
    }
  };
}

function describeComparison(comparison: LayoutComparison): string {
  const format = (value: number | null) => (value === null ? "n/a" : value.toPrecision(3));
  const header = `${"layout".padEnd(20)}${"shards".padStart(7)}${"JS".padStart(10)}${"α̂".padStart(10)}${"ζ*²".padStart(10)}${"ρ".padStart(10)}  verdict`;
  const lines = comparison.layouts.map(({ name, shards, summary }) =>
    [
      name.padEnd(20),
      String(shards).padStart(7),
      format(summary.labelSkew.js).padStart(10),
      format(summary.labelSkew.dirichletAlpha).padStart(10),
      format(summary.heterogeneity.zeta2Star).padStart(10),
      format(summary.advice.ratio).padStart(10),
      `  ${summary.advice.verdict}${summary.advice.heterogeneityBarrier ? " (barrier)" : ""}`,
    ].join(""),
  );
  const failures = comparison.failures.map(
    (failure) => `failed: ${failure.name}: ${failure.message}`,
  );
  return `${[header, ...lines, ...failures].join("\n")}\n`;
}

runCommand(main);
