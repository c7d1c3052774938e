/**
 * The workers case of `npm run bench` (`-- --workers`): one analysis of the 1M bench file run by
 * one worker process pinned to one core (`taskset -c 0`), then by two, each pinned to a core of
 * its own (`taskset -c 0` and `-c 1`) and sharing the analysis in two parts (methods.md §9's
 * digests, lib/reports/analysis-in-parts.ts). Throwaway PostgreSQL and S3 fake on free loopback
 * ports (not pinned). The time of each run is the coordinating worker's own: from taking the
 * analysis's job to its report stored. Prints both and the speed-up.
 */
import { execFile, spawn, type ChildProcess } from "node:child_process";
import { createHash } from "node:crypto";
import { createReadStream } from "node:fs";
import path from "node:path";
import { promisify } from "node:util";
import { Supervisor } from "../services/processes";
import { startThrowawayServices } from "../services/throwaway-services";

const run = promisify(execFile);
const NODE_ARGS = ["--conditions=react-server", "--import", "tsx"];

/** Worker processes pinned to cores 0 … count − 1, their output gathered to wait on. */
function startPinnedWorkers(projectRoot: string, env: NodeJS.ProcessEnv, count: number) {
  const workers = Array.from({ length: count }, (_, core) => {
    const child = spawn(
      "taskset",
      ["-c", String(core), process.execPath, ...NODE_ARGS, "scripts/worker.ts"],
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

async function sha256Of(file: string): Promise<string> {
  const hash = createHash("sha256");
  for await (const chunk of createReadStream(file)) hash.update(chunk as Buffer);
  return hash.digest("hex");
}

/** One analysis of `file` by `count` pinned workers; the coordinating worker's seconds. */
async function timeWorkers(
  projectRoot: string,
  env: NodeJS.ProcessEnv,
  file: string,
  sha256: string,
  count: number,
): Promise<number> {
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
    return Number(seconds);
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
      `  ${one.toFixed(1)} s\ntwo workers, each pinned to a core, two parts …\n`,
    );
    const two = await timeWorkers(projectRoot, env, file, sha256, 2);
    process.stdout.write(
      `  ${two.toFixed(1)} s\nspeed-up of two workers over one: ${(one / two).toFixed(2)}× (target ≥ 1.7×)\n`,
    );
  } finally {
    await supervisor.shutdown();
  }
}
