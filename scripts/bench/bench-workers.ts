/**
 * The workers case of `npm run bench` (`-- --workers`): one analysis of the 1M bench file run by
 * one worker process pinned to one core (`taskset -c 0`), then by two, each pinned to a core of
 * its own (`taskset -c 0` and `-c 1`) and sharing the analysis in two parts (methods.md §9's
 * digests, lib/reports/analysis-in-parts.ts). Throwaway PostgreSQL and S3 fake on free loopback
 * ports (not pinned). The time of each run is the coordinating worker's own: from taking the
 * analysis's job to its report stored. Prints both and the speed-up, with each worker's CPU time
 * over the same span (steadier than wall time while other work loads the machine) and the load
 * average before each run.
 */
import { execFile, spawn, type ChildProcess } from "node:child_process";
import { createHash } from "node:crypto";
import { createReadStream, readFileSync } from "node:fs";
import { loadavg } from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { Supervisor } from "../services/processes";
import { startThrowawayServices } from "../services/throwaway-services";

const run = promisify(execFile);
const NODE_ARGS = ["--conditions=react-server", "--import", "tsx"];

/**
 * Worker processes pinned to cores 0 … count − 1, their output gathered to wait on. Each starts in
 * a session of its own (`setsid`), as a worker on a machine of its own would be: Linux's
 * scheduler shares the CPU fairly among sessions (autogroups), so workers started in one session
 * would share one session's part of a busy machine however many cores they are pinned to.
 */
function startPinnedWorkers(projectRoot: string, env: NodeJS.ProcessEnv, count: number) {
  const workers = Array.from({ length: count }, (_, core) => {
    const child = spawn(
      "setsid",
      ["taskset", "-c", String(core), process.execPath, ...NODE_ARGS, "scripts/worker.ts"],
      { cwd: projectRoot, env, stdio: ["ignore", "pipe", "pipe"] },
    );
    const worker = { child, output: "" };
    for (const stream of [child.stdout, child.stderr]) {
      stream.setEncoding("utf8").on("data", (chunk: string) => (worker.output += chunk));
    }
    return worker;
  });
  /** The first match of `pattern` in any worker's output, as soon as it is printed. */
  const waitFor = (pattern: RegExp) =>
    new Promise<RegExpExecArray>((resolve, reject) => {
      const look = () => {
        for (const worker of workers) {
          const match = pattern.exec(worker.output);
          if (match) {
            clearInterval(timer);
            resolve(match);
            return;
          }
          if (worker.child.exitCode !== null) {
            clearInterval(timer);
            reject(new Error(`a worker exited:\n${worker.output}`));
            return;
          }
        }
      };
      const timer = setInterval(look, 200);
    });
  const stop = () =>
    Promise.all(
      workers.map(
        ({ child }: { child: ChildProcess }) =>
          new Promise<void>((resolve) => {
            if (child.exitCode !== null) return resolve();
            child.once("exit", () => resolve());
            child.kill("SIGTERM");
          }),
      ),
    );
  return { workers, waitFor, stop };
}

/** Clock ticks per second of /proc/<pid>/stat times (USER_HZ, 100 on Linux). */
const CLOCK_TICKS = 100;

/** User + system CPU seconds of a process so far, all its threads included. */
function cpuSecondsOf(pid: number): number {
  const stat = readFileSync(`/proc/${pid}/stat`, "utf8");
  // Fields 14 and 15 (utime, stime), counted after the command name.
  const fields = stat.slice(stat.lastIndexOf(")") + 2).split(" ");
  return (Number(fields[11]) + Number(fields[12])) / CLOCK_TICKS;
}

interface WorkersRun {
  /** The coordinating worker's seconds from taking the job to the stored report. */
  seconds: number;
  /** Each worker's CPU seconds from queueing the analysis to its end. */
  cpuSeconds: number[];
  /** The one-minute load average before the run. */
  load: number;
}

async function sha256Of(file: string): Promise<string> {
  const hash = createHash("sha256");
  for await (const chunk of createReadStream(file)) hash.update(chunk as Buffer);
  return hash.digest("hex");
}

/** One analysis of `file` by `count` pinned workers. */
async function timeWorkers(
  projectRoot: string,
  env: NodeJS.ProcessEnv,
  file: string,
  sha256: string,
  count: number,
): Promise<WorkersRun> {
  const workerEnv = { ...env, PARTITA_ANALYSIS_PARTS: String(count) };
  const pinned = startPinnedWorkers(projectRoot, workerEnv, count);
  try {
    await Promise.all(
      pinned.workers.map(
        (_, index) =>
          new Promise<void>((resolve, reject) => {
            const timer = setInterval(() => {
              const { output, child } = pinned.workers[index];
              if (/\[worker\] ready/.test(output)) resolve();
              else if (child.exitCode !== null) reject(new Error(`a worker exited:\n${output}`));
              else return;
              clearInterval(timer);
            }, 200);
          }),
      ),
    );
    const load = loadavg()[0];
    const cpuBefore = pinned.workers.map(({ child }) => cpuSecondsOf(child.pid as number));
    const queued = await run(
      process.execPath,
      [...NODE_ARGS, path.join(projectRoot, "scripts/bench/queue-analysis.ts"), file, sha256],
      { cwd: projectRoot, env, maxBuffer: 1024 * 1024 },
    );
    const { analysisId } = JSON.parse(queued.stdout) as { analysisId: string };
    const [, outcome, seconds] = await pinned.waitFor(
      new RegExp(`analysis ${analysisId}, attempt \\d+ of \\d+: (\\w+).* in ([\\d.]+) s`),
    );
    if (outcome !== "succeeded") {
      throw new Error(
        `the analysis ${outcome}:\n${pinned.workers.map((w) => w.output).join("\n")}`,
      );
    }
    const cpuSeconds = pinned.workers.map(
      ({ child }, index) => cpuSecondsOf(child.pid as number) - cpuBefore[index],
    );
    return { seconds: Number(seconds), cpuSeconds, load };
  } finally {
    await pinned.stop();
  }
}

export async function benchWorkers(projectRoot: string, file: string): Promise<void> {
  const supervisor = new Supervisor();
  supervisor.installExitHandlers();
  try {
    const { env } = await startThrowawayServices(supervisor);
    const sha256 = await sha256Of(file);
    process.stdout.write("one worker pinned to one core …\n");
    const one = await timeWorkers(projectRoot, env, file, sha256, 1);
    process.stdout.write(
      `  ${describeRun(one)}\ntwo workers, each pinned to a core, two parts …\n`,
    );
    const two = await timeWorkers(projectRoot, env, file, sha256, 2);
    const busiest = Math.max(...two.cpuSeconds);
    process.stdout.write(
      `  ${describeRun(two)}\n` +
        `speed-up of two workers over one: ${(one.seconds / two.seconds).toFixed(2)}× (target ≥ 1.7×); ` +
        `by CPU time, one worker's over the busier of two: ${(one.cpuSeconds[0] / busiest).toFixed(2)}×\n`,
    );
  } finally {
    await supervisor.shutdown();
  }
}

function describeRun(run: WorkersRun): string {
  const cpu = run.cpuSeconds.map((seconds) => `${seconds.toFixed(1)} s`).join(" + ");
  return `${run.seconds.toFixed(1)} s wall, CPU ${cpu} (load average ${run.load.toFixed(1)} before)`;
}
