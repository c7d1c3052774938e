/**
 * `npm run bench`: generates seeded synthetic data (bench-out/, git-ignored), runs the analyze CLI
 * end to end and, side by side, the NumPy/pandas/SciPy script scripts/bench/reference_summary.py
 * computing the same summary; prints per-stage times, rows/s, CPU time, peak memory (VmHWM), the
 * time ratio and how closely the two summaries agree, and fails when they disagree by more than
 * 1e-4 relative. Then the simulation case: the analyze CLI with `--simulate` (methods.md §7) on the
 * 100k data, timing the simulation stage. Then the load test (scripts/bench/load-test.ts): the app
 * on throwaway loopback services with 1,000 stored reports, under 20 concurrent clients. Then the
 * digest case (methods.md §9): one client's digests of the 1M data for a supplied reference against
 * one local analysis of it, and the pooled-optimum fit with 5 clients on the 100k data against the
 * central fit. `--small` runs only the 100k case, `--large` only the 1M case, `--simulation` only
 * the simulation case, `--load` only the load test, `--digests` only the digest case, `--layouts`
 * only the planner case: `npm run layouts` with its eight default candidates (methods.md §8) on the
 * 100k data against one analysis of it, both with every core (target: at most 4× its wall time).
 * `--huge`, never part of a plain run (it writes about 5.5 GB of CSV and takes many minutes), runs
 * the beyond-memory case: 10M rows under the default 2 GiB memory limit, so the encoded rows live in
 * a scratch file, against the 1M case in the same run (targets: peak ≤ 2 GiB, wall ≤ 12× the 1M's).
 * `--workers`, never part of a plain run either, times one analysis of the 1M data by one worker
 * process pinned to a core against two pinned workers sharing it in parts (scripts/bench/bench-workers.ts);
 * `--workers-huge` does the same on the 10M data, the case the target (two ≥ 1.7× faster) is set on.
 */
import { spawn } from "node:child_process";
import { existsSync, mkdirSync, readFileSync, statSync, writeFileSync } from "node:fs";
import { availableParallelism, loadavg } from "node:os";
import path from "node:path";
import { countAvailableThreads, type DigestEncoding, type PartitionSummary } from "../lib/analysis";
import { splitBenchFile, timeDigestFit } from "./bench/bench-digests";
import { benchWorkers } from "./bench/bench-workers";
import { writeBenchData, type BenchDataSpec } from "./bench/generate-data";
import { LOAD_CLIENTS, LOAD_REPORTS, runLoadTest } from "./bench/load-test";

const root = path.resolve(import.meta.dirname, "..");
const outputFolder = path.join(root, "bench-out");
const PYTHON = "/usr/bin/python3";
/** Environment variables that hold OpenBLAS to a chosen kernel; unset for the reference's process. */
const OPENBLAS_PINS = ["OPENBLAS_CORETYPE", "OPENBLAS_L2_SIZE"];
/** Largest relative difference between the two summaries the bench accepts. */
const AGREEMENT_TOLERANCE = 1e-4;
/** Clock ticks per second of /proc/<pid>/stat times (USER_HZ, 100 on Linux). */
const CLOCK_TICKS = 100;

const CASES: BenchDataSpec[] = [
  { rows: 100_000, features: 32, classes: 10, shards: 100, alpha: 0.5, seed: 1 },
  { rows: 1_000_000, features: 64, classes: 10, shards: 100, alpha: 0.5, seed: 2 },
];
/** The beyond-memory case: its encoded rows (5.2 GB) are far past the default limit's share. */
const HUGE_CASE: BenchDataSpec = {
  rows: 10_000_000,
  features: 64,
  classes: 10,
  shards: 100,
  alpha: 0.5,
  seed: 4,
};
/** Its targets: peak resident memory (MB) and wall time as a multiple of the 1M case's. */
const HUGE_PEAK_MEGABYTES = 2048;
const HUGE_WALL_RATIO = 12;
/** The load test's reports hold this data's summary: 100 shards, as a typical layout has. */
const LOAD_CASE: BenchDataSpec = {
  rows: 20_000,
  features: 8,
  classes: 5,
  shards: 100,
  alpha: 0.5,
  seed: 3,
};
/** The simulation case of issue 6: every one of the 100 shards each round, K = 10, R = 100, b = 32. */
const SIMULATION_PLAN = { participants: 100, localSteps: 10, rounds: 100, batchSize: 32 };

interface StageTime {
  seconds: number;
  cpuSeconds: number;
}

interface RunResult {
  seconds: number;
  /** User + system CPU time of all the process's threads (sampled, so to within 0.05 s). */
  cpuSeconds: number;
  peakMegabytes: number;
  stages: Record<string, StageTime>;
  stdout: string;
  stderr: string;
  code: number | null;
}

/**
 * Runs a command, timing stage markers seen on stderr and sampling its peak resident memory and
 * CPU time. Other work on the machine slows both programs; CPU time shows the work each did.
 */
function runMeasured(
  command: string,
  args: string[],
  stageOf: (line: string) => string | null,
): Promise<RunResult> {
  return new Promise((resolve) => {
    const started = performance.now();
    const child = spawn(command, args, { cwd: root, stdio: ["ignore", "pipe", "pipe"] });
    const stageStarts: Array<{ stage: string; at: number; cpuTicks: number }> = [];
    let stdout = "";
    let stderr = "";
    let peakKilobytes = 0;
    let cpuTicks = 0;
    const sample = () => {
      try {
        const status = readFileSync(`/proc/${child.pid}/status`, "utf8");
        const match = /VmHWM:\s+(\d+) kB/.exec(status);
        if (match) peakKilobytes = Math.max(peakKilobytes, Number(match[1]));
        // Fields 14 and 15 of /proc/<pid>/stat (utime, stime), counted after the command name.
        const stat = readFileSync(`/proc/${child.pid}/stat`, "utf8");
        const fields = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
        cpuTicks = Math.max(cpuTicks, Number(fields[11]) + Number(fields[12]));
      } catch {
        // The process has just exited; the last sample stands.
      }
    };
    const sampler = setInterval(sample, 50);
    child.stdout.on("data", (chunk: Buffer) => (stdout += chunk.toString()));
    child.stderr.on("data", (chunk: Buffer) => {
      const text = chunk.toString();
      stderr += text;
      for (const line of text.split("\n")) {
        const stage = stageOf(line);
        if (stage && stageStarts.at(-1)?.stage !== stage) {
          sample();
          stageStarts.push({ stage, at: performance.now(), cpuTicks });
        }
      }
    });
    child.on("close", (code) => {
      clearInterval(sampler);
      const ended = performance.now();
      const stages: Record<string, StageTime> = {};
      stageStarts.forEach(({ stage, at, cpuTicks: startTicks }, index) => {
        const next = stageStarts[index + 1] ?? { at: ended, cpuTicks };
        const time = (stages[stage] ??= { seconds: 0, cpuSeconds: 0 });
        time.seconds += (next.at - at) / 1000;
        time.cpuSeconds += (next.cpuTicks - startTicks) / CLOCK_TICKS;
      });
      resolve({
        seconds: (ended - started) / 1000,
        cpuSeconds: cpuTicks / CLOCK_TICKS,
        peakMegabytes: peakKilobytes / 1024,
        stages,
        stdout,
        stderr,
        code,
      });
    });
  });
}

function relativeDifference(a: number, b: number): number {
  return Math.abs(a - b) / Math.max(Math.abs(a), Math.abs(b), 1e-300);
}

/** The case's data file, generated on first use; prints the case's heading. */
async function prepareData(spec: BenchDataSpec, heading = ""): Promise<string> {
  const name = `${spec.rows}x${spec.features}x${spec.classes}`;
  const file = path.join(outputFolder, `bench-${name}-seed${spec.seed}.csv`);
  if (!existsSync(file)) {
    process.stdout.write(`generating ${file} …\n`);
    await writeBenchData(file, spec);
  }
  const megabytes = statSync(file).size / 2 ** 20;
  process.stdout.write(
    `\n== ${heading}${spec.rows} rows × ${spec.features} features × ${spec.classes} classes, ${spec.shards} shards (${megabytes.toFixed(0)} MB)\n`,
  );
  return file;
}

/** The analyze CLI on a bench file, timed by the stages it reports on stderr. */
async function runEngine(file: string, extraArgs: string[] = []): Promise<RunResult> {
  const engine = await runMeasured(
    process.execPath,
    [
      "--max-old-space-size=1800",
      "--import",
      "tsx",
      "scripts/analyze.ts",
      "--data",
      file,
      "--label",
      "label",
      "--shard-column",
      "shard",
      ...extraArgs,
    ],
    (line) => /^partita: (\w+) /.exec(line)?.[1] ?? null,
  );
  if (engine.code !== 0) throw new Error(`analyze failed: ${engine.stderr}`);
  return engine;
}

async function benchCase(spec: BenchDataSpec): Promise<void> {
  const file = await prepareData(spec);
  const engine = await runEngine(file);
  // This machine's environment pins OpenBLAS to older kernels (OPENBLAS_CORETYPE, OPENBLAS_L2_SIZE);
  // the reference runs without those pins, as NumPy would by default, and says which kernel it used.
  const python = await runMeasured(
    "env",
    [
      ...OPENBLAS_PINS.flatMap((name) => ["-u", name]),
      PYTHON,
      path.join(root, "scripts/bench/reference_summary.py"),
      file,
      "label",
      "shard",
    ],
    () => null,
  );
  if (python.code !== 0) throw new Error(`reference script failed: ${python.stderr}`);
  const pythonStages = JSON.parse(python.stderr.trim().split("\n").at(-1) as string) as Record<
    string,
    number
  >;

  const blas = /^blas (.*)$/m.exec(python.stderr)?.[1] ?? "[]";
  const kernels = (JSON.parse(blas) as Array<Record<string, unknown>>)
    .map(
      (pool) =>
        `${pool.internal_api} ${pool.version}, ${pool.architecture} kernel, ${pool.num_threads} threads`,
    )
    .join("; ");
  const stageLine = (stages: Record<string, number>) =>
    Object.entries(stages)
      .map(([stage, seconds]) => `${stage} ${seconds.toFixed(1)}s`)
      .join(", ");
  const engineStages = Object.fromEntries(
    Object.entries(engine.stages).map(([stage, time]) => [stage, time.seconds]),
  );
  const ours = JSON.parse(engine.stdout);
  const theirs = JSON.parse(python.stdout);
  process.stdout.write(
    `engine (TypeScript): ${engine.seconds.toFixed(1)}s end to end, ${(spec.rows / engine.seconds).toFixed(0)} rows/s, CPU ${engine.cpuSeconds.toFixed(1)}s, peak ${engine.peakMegabytes.toFixed(0)} MB\n` +
      `  stages: ${stageLine(engineStages)}; fit ${ours.model.optimizer.iterations} L-BFGS iterations, ${ours.model.optimizer.evaluations} full passes\n` +
      `reference (NumPy/pandas/SciPy): ${python.seconds.toFixed(1)}s end to end, ${(spec.rows / python.seconds).toFixed(0)} rows/s, CPU ${python.cpuSeconds.toFixed(1)}s, peak ${python.peakMegabytes.toFixed(0)} MB\n` +
      `  stages: ${stageLine(pythonStages)}; fit ${theirs.model.iterations} L-BFGS-B iterations\n` +
      `  BLAS: ${kernels || "none reported"} (${OPENBLAS_PINS.join(", ")} unset)\n` +
      `time ratio engine / reference: ${(engine.seconds / python.seconds).toFixed(2)}\n`,
  );
  const compared: Array<[string, number, number]> = [
    ["model.loss", ours.model.loss, theirs.model.loss],
    ["model.distance", ours.model.distance, theirs.model.distance],
    ["heterogeneity.zeta2", ours.heterogeneity.zeta2, theirs.heterogeneity.zeta2],
    ["heterogeneity.zeta2Max", ours.heterogeneity.zeta2Max, theirs.heterogeneity.zeta2Max],
    ["heterogeneity.sigma2", ours.heterogeneity.sigma2, theirs.heterogeneity.sigma2],
    [
      "heterogeneity.sigma2Pooled",
      ours.heterogeneity.sigma2Pooled,
      theirs.heterogeneity.sigma2Pooled,
    ],
    ["heterogeneity.smoothness", ours.heterogeneity.smoothness, theirs.heterogeneity.smoothness],
    ["labelSkew.js", ours.labelSkew.js, theirs.labelSkew.js],
    ["labelSkew.dirichletAlpha", ours.labelSkew.dirichletAlpha, theirs.labelSkew.dirichletAlpha],
    ["advice.local", ours.advice.local, theirs.advice.local],
  ];
  let worst: [string, number] = ["", 0];
  for (const [key, a, b] of compared) {
    if (relativeDifference(a, b) > worst[1]) worst = [key, relativeDifference(a, b)];
  }
  process.stdout.write(
    `agreement: largest relative difference ${worst[1].toExponential(1)} (${worst[0]}); verdicts ${ours.advice.verdict} / ${theirs.advice.verdict}\n`,
  );
  if (!(worst[1] <= AGREEMENT_TOLERANCE) || ours.advice.verdict !== theirs.advice.verdict) {
    throw new Error(
      `the engine and the reference disagree (${worst[0]}: ${worst[1].toExponential(1)} relative, more than ${AGREEMENT_TOLERANCE})`,
    );
  }
}

/**
 * The simulation of methods.md §7 under SIMULATION_PLAN with the default S = 3 seeds (33 runs),
 * through the CLI as a user runs it; its stage's wall and CPU time are the simulation's own.
 */
async function benchSimulation(spec: BenchDataSpec): Promise<void> {
  const file = await prepareData(spec, "simulation: ");
  const { participants, localSteps, rounds, batchSize } = SIMULATION_PLAN;
  const engine = await runEngine(file, [
    "--participants",
    String(participants),
    "--local-steps",
    String(localSteps),
    "--rounds",
    String(rounds),
    "--batch-size",
    String(batchSize),
    "--simulate",
  ]);
  const summary = JSON.parse(engine.stdout) as PartitionSummary;
  const simulation = summary.simulation;
  const stage = engine.stages.simulating;
  if (!simulation || !stage) throw new Error("the analyze CLI ran no simulation");
  const finals = simulation.algorithms
    .map((algorithm) => `${algorithm.name} ${algorithm.final?.toExponential(2) ?? "n/a"}`)
    .join(", ");
  process.stdout.write(
    `plan M=${participants} K=${localSteps} R=${rounds} b=${batchSize}, ${simulation.seeds} seeds (${simulation.algorithms.reduce((runs, algorithm) => runs + algorithm.grid.length + simulation.seeds, 0)} runs), estimated ${simulation.cost.toExponential(2)} multiply-adds, ${countAvailableThreads()} threads\n` +
      `simulation: ${stage.seconds.toFixed(1)}s wall, CPU ${stage.cpuSeconds.toFixed(1)}s (CPU / wall ${(stage.cpuSeconds / stage.seconds).toFixed(2)})\n` +
      `engine end to end: ${engine.seconds.toFixed(1)}s wall, CPU ${engine.cpuSeconds.toFixed(1)}s, peak ${engine.peakMegabytes.toFixed(0)} MB\n` +
      `final F − F*: ${finals}; verdict ${simulation.verdict} (bounds: ${summary.advice.verdict})\n`,
  );
}

/** The load test on reports of LOAD_CASE's summary, made by the analyze CLI. */
async function benchLoad(): Promise<void> {
  const file = await prepareData(LOAD_CASE, "load test: the reports hold the summary of ");
  const engine = await runEngine(file);
  const summaryFile = path.join(outputFolder, "load-summary.json");
  writeFileSync(summaryFile, engine.stdout);
  process.stdout.write(
    `${LOAD_REPORTS} reports of ${(engine.stdout.length / 1024).toFixed(0)} kB each, ${LOAD_CLIENTS} concurrent clients on loopback\n`,
  );
  await runLoadTest(root, summaryFile);
}

/** `npm run digest -- …` on a bench file, timed end to end. */
async function runDigest(args: string[]): Promise<RunResult> {
  const run = await runMeasured(
    process.execPath,
    ["--max-old-space-size=1800", "--import", "tsx", "scripts/digest.ts", ...args],
    () => null,
  );
  if (run.code !== 0) throw new Error(`digest failed: ${run.stderr}`);
  return run;
}

/**
 * The digest case of issue 11: (1) on the 1M data as one client, its round-1 and round-2 digests
 * for a supplied reference (W = 0.01 everywhere) against one local analysis with that reference;
 * (2) on the 100k data split among 5 clients, the pooled-optimum fit from their evaluation rounds
 * (in one process) against the central analysis's fit stage.
 */
async function benchDigests(large: BenchDataSpec, small: BenchDataSpec): Promise<void> {
  const file = await prepareData(large, "digests: ");
  const data = ["--data", file, "--label", "label", "--shard-column", "shard"];
  const schemaFile = path.join(outputFolder, "digest-schema.json");
  const encodingFile = path.join(outputFolder, "digest-encoding.json");
  const weightsFile = path.join(outputFolder, "digest-w.json");
  const schema = await runDigest(["schema", ...data, "--out", schemaFile]);
  await runDigest(["encoding", schemaFile, "--out", encodingFile]);
  const encoding = JSON.parse(readFileSync(encodingFile, "utf8")) as DigestEncoding;
  const width = encoding.featureNames.length + 1;
  writeFileSync(
    weightsFile,
    JSON.stringify({
      classes: encoding.classes,
      features: encoding.featureNames,
      weights: (encoding.classes ?? [null]).map(() => new Array<number>(width).fill(0.01)),
    }),
  );
  const gradients = await runDigest([
    "gradients",
    ...data,
    "--encoding",
    encodingFile,
    "--at",
    weightsFile,
    "--out",
    path.join(outputFolder, "digest-gradients.json"),
  ]);
  const local = await runEngine(file, ["--reference", weightsFile]);
  const digestSeconds = schema.seconds + gradients.seconds;
  const digestCpu = schema.cpuSeconds + gradients.cpuSeconds;
  process.stdout.write(
    `one client's digests (schema ${schema.seconds.toFixed(1)}s + gradients ${gradients.seconds.toFixed(1)}s): ${digestSeconds.toFixed(1)}s wall, CPU ${digestCpu.toFixed(1)}s, peak ${Math.max(schema.peakMegabytes, gradients.peakMegabytes).toFixed(0)} MB
` +
      `one local analysis (--reference W): ${local.seconds.toFixed(1)}s wall, CPU ${local.cpuSeconds.toFixed(1)}s, peak ${local.peakMegabytes.toFixed(0)} MB
` +
      `ratio digests / analysis: ${(digestSeconds / local.seconds).toFixed(2)} wall, ${(digestCpu / local.cpuSeconds).toFixed(2)} CPU
`,
  );

  const smallFile = await prepareData(small, "digests, pooled-optimum fit with 5 clients: ");
  const central = await runEngine(smallFile);
  const fitting = central.stages.fitting;
  const parts = await splitBenchFile(smallFile, 5);
  const fit = await timeDigestFit(parts);
  process.stdout.write(
    `fit from 5 clients' rounds: ${fit.seconds.toFixed(1)}s wall (${fit.rounds} evaluation rounds)
` +
      `central fit stage: ${fitting.seconds.toFixed(1)}s wall, CPU ${fitting.cpuSeconds.toFixed(1)}s
` +
      `ratio: ${(fit.seconds / fitting.seconds).toFixed(2)}
`,
  );
}

/**
 * The 1M case, then the 10M case with the default memory limit (its rows go to a scratch file in
 * bench-out/), each through the analyze CLI; their peaks and the ratio of their wall times.
 */
async function benchHuge(): Promise<void> {
  const baseFile = await prepareData(CASES[1], "beyond memory, first the ");
  const base = await runEngine(baseFile);
  const file = await prepareData(HUGE_CASE, "beyond memory: ");
  const huge = await runEngine(file, ["--scratch-dir", outputFolder]);
  const describe = (run: RunResult) =>
    `${run.seconds.toFixed(1)}s wall, CPU ${run.cpuSeconds.toFixed(1)}s, peak ${run.peakMegabytes.toFixed(0)} MB; stages ` +
    Object.entries(run.stages)
      .map(([stage, time]) => `${stage} ${time.seconds.toFixed(1)}s`)
      .join(", ");
  const ratio = huge.seconds / base.seconds;
  process.stdout.write(
    `1M case: ${describe(base)}
` +
      `10M case (rows in a scratch file: ${/scratch file/.test(huge.stderr) ? "yes" : "no"}): ${describe(huge)}
` +
      `peak ${huge.peakMegabytes.toFixed(0)} MB (target at most ${HUGE_PEAK_MEGABYTES}); wall 10M / 1M ${ratio.toFixed(2)} (target at most ${HUGE_WALL_RATIO})\n`,
  );
}

/** The planner's target: eight candidates in at most this many times one analysis's wall time. */
const LAYOUTS_TARGET_RATIO = 4;

/**
 * The layout planner's eight default candidates (no group column) into as many shards as the case
 * has, beside one analysis of the same file: one read and encoding, then eight fits and measures.
 */
async function benchLayouts(spec: BenchDataSpec): Promise<void> {
  const file = await prepareData(spec, "layout planner: ");
  const analysis = await runEngine(file);
  const outDir = path.join(outputFolder, "layouts");
  const planner = await runMeasured(
    process.execPath,
    [
      "--max-old-space-size=1800",
      "--import",
      "tsx",
      "scripts/layouts.ts",
      "--data",
      file,
      "--label",
      "label",
      "--features",
      Array.from({ length: spec.features }, (_, j) => `f${j}`).join(","),
      "--shards",
      String(spec.shards),
      "--out-dir",
      outDir,
    ],
    () => null,
  );
  if (planner.code !== 0) throw new Error(`layouts failed: ${planner.stderr}`);
  const comparison = JSON.parse(readFileSync(path.join(outDir, "layouts.json"), "utf8")) as {
    layouts: unknown[];
    failures: Array<{ name: string; message: string }>;
  };
  const ratio = planner.seconds / analysis.seconds;
  process.stdout.write(
    `one analysis: ${analysis.seconds.toFixed(1)}s wall, CPU ${analysis.cpuSeconds.toFixed(1)}s, peak ${analysis.peakMegabytes.toFixed(0)} MB\n` +
      `planner, ${comparison.layouts.length} candidates scored (${comparison.failures.length} failed${comparison.failures.map((failure) => `: ${failure.name} ${failure.message}`).join("")}): ` +
      `${planner.seconds.toFixed(1)}s wall, CPU ${planner.cpuSeconds.toFixed(1)}s, peak ${planner.peakMegabytes.toFixed(0)} MB, ${countAvailableThreads()} threads\n` +
      `planner / analysis wall time: ${ratio.toFixed(2)} (target at most ${LAYOUTS_TARGET_RATIO})\n`,
  );
}

async function main(): Promise<void> {
  mkdirSync(outputFolder, { recursive: true });
  process.stdout.write(
    `machine: ${availableParallelism()} cores, load average ${loadavg()[0].toFixed(1)} at the start (other work on the machine slows both programs)\n`,
  );
  const only = [
    "--small",
    "--large",
    "--simulation",
    "--load",
    "--digests",
    "--layouts",
    "--huge",
    "--workers",
    "--workers-huge",
  ].find((flag) => process.argv.includes(flag));
  if (only === undefined || only === "--small") await benchCase(CASES[0]);
  if (only === undefined || only === "--large") await benchCase(CASES[1]);
  if (only === undefined || only === "--simulation") await benchSimulation(CASES[0]);
  if (only === undefined || only === "--load") await benchLoad();
  if (only === undefined || only === "--digests") await benchDigests(CASES[1], CASES[0]);
  if (only === undefined || only === "--layouts") await benchLayouts(CASES[0]);
  if (only === "--huge") await benchHuge();
  // Never part of a plain run: they pin workers to both cores for minutes (10M: most of an hour).
  if (only === "--workers") {
    await benchWorkers(root, await prepareData(CASES[1], "workers, one analysis in parts: "));
  }
  if (only === "--workers-huge") {
    await benchWorkers(root, await prepareData(HUGE_CASE, "workers, one analysis in parts: "));
  }
}

main().catch((error: unknown) => {
  process.stderr.write(`bench failed: ${error instanceof Error ? error.message : String(error)}\n`);
  process.exit(1);
});
