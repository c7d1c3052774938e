import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";
import type PgBoss from "pg-boss";
import { expect } from "vitest";
import type { PartitionSummary } from "@/lib/analysis";
import { ANALYSIS_PART_JOB_POLICY, ANALYSIS_PART_QUEUE } from "@/lib/jobs";
import type { PartsSettings } from "@/lib/reports/analysis-in-parts";
import { compareSummaries } from "../../analysis/digests/support";

const projectRoot = path.resolve(import.meta.dirname, "../../../..");

/** A worker process as deployed, its output kept to wait on. */
export class WorkerProcess {
  readonly process: ChildProcess;
  output = "";

  constructor(extraEnv: Record<string, string>) {
    this.process = spawn(
      process.execPath,
      ["--conditions=react-server", "--import", "tsx", "scripts/worker.ts"],
      {
        cwd: projectRoot,
        env: { ...process.env, ...extraEnv },
        stdio: ["ignore", "pipe", "pipe"],
      },
    );
    for (const stream of [this.process.stdout, this.process.stderr]) {
      stream?.setEncoding("utf8").on("data", (chunk: string) => (this.output += chunk));
    }
  }

  /** Resolves with the first match of `pattern` in the output, as soon as it is printed. */
  waitFor(pattern: RegExp, timeoutMs = 120_000): Promise<RegExpExecArray> {
    return new Promise((resolve, reject) => {
      const timer = setTimeout(
        () => reject(new Error(`worker never printed ${pattern}:\n${this.output}`)),
        timeoutMs,
      );
      const check = () => {
        const match = pattern.exec(this.output);
        if (!match) return;
        clearTimeout(timer);
        this.process.stdout?.off("data", check);
        resolve(match);
      };
      this.process.stdout?.on("data", check);
      check();
    });
  }

  /** Sends `signal` (SIGKILL by default: no chance to clean up) and waits for the exit. */
  kill(signal: NodeJS.Signals = "SIGKILL"): Promise<void> {
    if (this.process.exitCode !== null || this.process.signalCode !== null) {
      return Promise.resolve();
    }
    const exited = new Promise<void>((resolve) => this.process.once("exit", () => resolve()));
    this.process.kill(signal);
    return exited;
  }
}

/**
 * An analysis's parts sent as pg-boss jobs to the worker processes, which heartbeat every second;
 * this process takes a part only when no worker took it for 10 s.
 */
export function sendPartsTo(boss: PgBoss, parts: number): PartsSettings {
  return {
    parts,
    minBytes: 1,
    sendPart: (job) =>
      boss.send(ANALYSIS_PART_QUEUE, job, {
        ...ANALYSIS_PART_JOB_POLICY,
        singletonKey: `${job.runId}:${job.partIndex}`,
      }),
    heartbeatMs: 1000,
    staleAfterMs: 20_000,
    takeOverAfterMs: 10_000,
  };
}

/** The summary of an analysis in parts equals the one-process summary to 1e-9 relative. */
export function expectOneProcessSummary(actual: PartitionSummary, expected: PartitionSummary) {
  const differences = compareSummaries(expected, actual, false).filter(
    // ‖∇F(W*)‖ is the optimizer's residual: compared with its tolerance below.
    (line) => !line.startsWith(".model.gradNorm"),
  );
  expect(differences).toEqual([]);
  expect(actual.model.gradNorm).toBeLessThanOrEqual(actual.model.optimizer.tolerance);
  expect(actual.preprocessing.warnings).toEqual(expected.preprocessing.warnings);
  expect(actual.digests).toBeUndefined();
}
