import { Worker } from "node:worker_threads";
import { toShared } from "../pass-pool";
import type { RunOutcome, SimulationProblem, TrainingPlan } from "./run-algorithm";
import type { RunRequest, RunThreadData, RunThreadReport } from "./run-thread-protocol";

/** Does one run at a time, on some thread. */
export interface RunExecutor {
  execute(request: RunRequest, onRound: (round: number) => void): Promise<RunOutcome>;
}

export interface RunThreadCallbacks {
  /** A worker thread has loaded and is idle. */
  onReady: (executor: RunExecutor) => void;
  /** A worker thread failed (a defect, not bad input); its run, if any, is rejected too. */
  onFailure: (error: Error) => void;
}

/**
 * Worker threads that do whole simulation runs beside the calling thread, as the pass pool's
 * threads share the passes (pass-pool.ts): the design's arrays are shared, not copied (a design
 * not yet in shared memory is copied there once), and each thread registers its own TypeScript
 * loader. Runs are independent and a run's result depends only on its request, so which thread
 * does which run changes no number. Threads take about a second to load; each is handed to
 * `onReady` once it has. `close` ends them, mid-run or not.
 */
export class RunThreads {
  private readonly workers: Worker[];
  private closing = false;

  constructor(
    count: number,
    problem: SimulationProblem,
    plan: TrainingPlan,
    callbacks: RunThreadCallbacks,
  ) {
    const workerData: RunThreadData = { problem: shareProblem(problem), plan };
    this.workers = Array.from({ length: count }, () => {
      // No inherited flags (a test runner's, say): the entry registers its own TypeScript loader.
      const worker = new Worker(new URL("./run-thread-entry.mjs", import.meta.url), {
        execArgv: [],
        workerData,
      });
      const executor = new ThreadExecutor(worker);
      const fail = (error: Error) => {
        if (this.closing) return;
        executor.reject(error);
        callbacks.onFailure(error);
      };
      worker.on("message", (report: RunThreadReport) => {
        if (report.type === "ready") callbacks.onReady(executor);
        else if (report.type === "failed") fail(new Error(`simulation thread: ${report.detail}`));
        else executor.receive(report);
      });
      worker.on("error", fail);
      worker.on("exit", (code) => fail(new Error(`simulation thread exited (code ${code})`)));
      return worker;
    });
  }

  /** Ends the worker threads. */
  async close(): Promise<void> {
    this.closing = true;
    await Promise.all(this.workers.map((worker) => worker.terminate()));
  }
}

class ThreadExecutor implements RunExecutor {
  private pending: {
    resolve: (outcome: RunOutcome) => void;
    reject: (error: Error) => void;
    onRound: (round: number) => void;
  } | null = null;

  constructor(private readonly worker: Worker) {}

  execute(request: RunRequest, onRound: (round: number) => void): Promise<RunOutcome> {
    return new Promise((resolve, reject) => {
      this.pending = { resolve, reject, onRound };
      this.worker.postMessage(request);
    });
  }

  receive(report: Extract<RunThreadReport, { type: "round" | "done" }>): void {
    if (this.pending === null) return;
    if (report.type === "round") {
      this.pending.onRound(report.round);
      return;
    }
    const { resolve } = this.pending;
    this.pending = null;
    resolve({ suboptimality: report.suboptimality, diverged: report.diverged });
  }

  reject(error: Error): void {
    this.pending?.reject(error);
    this.pending = null;
  }
}

/** The problem with only what a run reads, every array in shared memory. */
function shareProblem(problem: SimulationProblem): SimulationProblem {
  const { design } = problem;
  return {
    design: {
      x: { rows: design.x.rows, cols: design.x.cols, data: toShared(design.x.data) },
      labels: design.labels && toShared(design.labels),
      targets: design.targets && toShared(design.targets),
      classes: design.classes,
      shardOffsets: toShared(design.shardOffsets),
    },
    lambda: problem.lambda,
    optimumValue: problem.optimumValue,
    startValue: problem.startValue,
  };
}
