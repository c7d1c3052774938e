import { Worker } from "node:worker_threads";
import {
  claimLayoutPlan,
  endLayoutPlan,
  recordLayoutPlanHeartbeat,
  recordLayoutPlanProgress,
  updateLayoutCandidate,
} from "@/db/queries/layout-plans";
import { env } from "@/lib/env";
import type { LayoutPlanJob } from "@/lib/jobs";
import { createCoalescedWrites } from "./coalesced-writes";
import type { PlanThreadInput, PlanThreadMessage } from "./plan-thread-protocol";
import { candidateFraction } from "./plan-progress";

export type PlanOutcome =
  | { outcome: "succeeded"; scored: number; failed: number }
  /** Bad input for the whole plan (a missing column, M too large): the engine's message. */
  | { outcome: "failed"; message: string }
  | { outcome: "cancelled" }
  /** Nothing to do: the plan was cancelled or taken before the job arrived. */
  | { outcome: "skipped" };

export interface PlanRunOptions {
  /** Whether the job will be tried again if this run throws. */
  willRetry: boolean;
  /** Aborted when the worker shuts down: the run stops and its job is handed back to the queue. */
  signal?: AbortSignal;
  /**
   * How often the run records its heartbeat, which also tells it when the plan was cancelled
   * (default 1 s, so a cancellation stops the thread within about a second).
   */
  heartbeatMs?: number;
  /** At least this long between two progress writes of one candidate. */
  progressIntervalMs?: number;
}

const INTERNAL_FAILURE =
  "The plan stopped because of an internal error, not because of your data. Please run it again later.";
const STORAGE_FAILURE =
  "Storage could not be reached, so the plan stopped. Your dataset is kept; run the plan again once storage is back.";
const INTERNAL_RETRY =
  "The plan was interrupted (not by your data). It will be tried again shortly.";

/**
 * One run of a layout plan job: claims the plan, runs the planner in a worker thread (it reads and
 * encodes the dataset once and scores the candidates on every core), and stores the shared stage's
 * progress, each candidate's progress and each candidate's result or failure as they come. A
 * failed candidate is recorded and the others go on; a cancelled plan stops the thread at once and
 * keeps the candidates already scored. An internal error hands the plan back to the queue (or fails
 * it on the last attempt) and rethrows so the queue retries; the retry runs only the candidates
 * that had not finished. `scored` and `failed` count this run's candidates.
 */
export async function runLayoutPlan(
  job: LayoutPlanJob,
  options: PlanRunOptions,
): Promise<PlanOutcome> {
  const plan = await claimLayoutPlan(job.workspaceId, job.planId, env().WORKER_STALE_AFTER_MS);
  if (!plan) return { outcome: "skipped" };
  if (plan.finishedOrdinals.length === plan.generators.length) {
    // An earlier run finished every candidate and stopped before it could end the plan.
    await endLayoutPlan(job.workspaceId, job.planId, { status: "succeeded" });
    return { outcome: "succeeded", scored: 0, failed: 0 };
  }
  const input: PlanThreadInput = {
    workspaceId: job.workspaceId,
    dataset: {
      kind: "dataset",
      name: plan.dataset.name,
      objectKey: plan.dataset.objectKey,
      sizeBytes: plan.dataset.sizeBytes,
    },
    options: plan.options,
    groupColumn: plan.groupColumn,
    shardCount: plan.shardCount,
    specs: plan.generators,
    seed: plan.seed,
    finishedIndexes: plan.finishedOrdinals,
  };
  const writes = createWriteQueue(job, options.progressIntervalMs ?? 500);
  const cancelled = new AbortController();
  // The planner computes in a thread, so this thread's beats go on however long a candidate takes.
  const heartbeat = setInterval(() => {
    void recordLayoutPlanHeartbeat(job.workspaceId, job.planId).then(
      (running) => running || cancelled.abort(),
      () => {},
    );
  }, options.heartbeatMs ?? 1000);
  let scored = 0;
  let failed = 0;
  try {
    const signal = options.signal
      ? AbortSignal.any([cancelled.signal, options.signal])
      : cancelled.signal;
    const end = await runPlanThread(input, signal, (message) => {
      switch (message.type) {
        case "plan-progress":
          writes.plan(message.progress.stage, message.progress.fraction);
          return;
        case "candidate-progress":
          writes.candidate(message.index, {
            status: "running",
            stage: message.progress?.stage ?? null,
            fraction: candidateFraction(message.progress),
          });
          return;
        case "candidate-done":
          scored++;
          writes.candidate(
            message.index,
            {
              status: "succeeded",
              stage: null,
              fraction: 1,
              summary: message.summary,
              mapObjectKey: message.mapObjectKey,
              mapSizeBytes: message.mapSizeBytes,
              finished: true,
            },
            true,
          );
          return;
        case "candidate-failed":
          failed++;
          writes.candidate(
            message.index,
            {
              status: "failed",
              failureMessage: message.failure.message,
              failedOnInput: message.failure.badInput,
              finished: true,
            },
            true,
          );
      }
    });
    await writes.flush();
    if (end.type === "finished") {
      await endLayoutPlan(job.workspaceId, job.planId, { status: "succeeded" });
      return { outcome: "succeeded", scored, failed };
    }
    const message = end.type === "input-error" ? end.message : STORAGE_FAILURE;
    await endLayoutPlan(job.workspaceId, job.planId, { status: "failed", message });
    return { outcome: "failed", message };
  } catch (error) {
    await writes.flush();
    if (cancelled.signal.aborted) return { outcome: "cancelled" };
    if (options.signal?.aborted) {
      console.warn(`[layout plan ${job.planId}] interrupted: the worker is stopping`);
    } else {
      console.error(
        `[layout plan ${job.planId}] run failed:`,
        error instanceof Error ? (error.stack ?? error.message) : error,
      );
    }
    await endLayoutPlan(job.workspaceId, job.planId, {
      status: options.willRetry ? "queued" : "failed",
      message: options.willRetry ? INTERNAL_RETRY : INTERNAL_FAILURE,
    });
    throw error;
  } finally {
    clearInterval(heartbeat);
  }
}

type CandidateValues = Parameters<typeof updateLayoutCandidate>[3];

/**
 * Database writes of one run, one at a time and in order: per candidate and for the plan, progress
 * is written at most every `intervalMs` and its latest value always; a candidate's end at once.
 */
function createWriteQueue(job: LayoutPlanJob, intervalMs: number) {
  const writes = createCoalescedWrites(intervalMs, (error) =>
    console.error(
      `[layout plan ${job.planId}] could not store progress:`,
      error instanceof Error ? error.message : error,
    ),
  );
  return {
    plan(stage: string, fraction: number) {
      writes.enqueue(
        "plan",
        () => recordLayoutPlanProgress(job.workspaceId, job.planId, { stage, fraction }),
        fraction === 1,
      );
    },
    candidate(index: number, values: CandidateValues, always = false) {
      writes.enqueue(
        `candidate ${index}`,
        () => updateLayoutCandidate(job.workspaceId, job.planId, index, values),
        always || values.fraction === 0,
      );
    },
    flush: () => writes.flush(),
  };
}

type ThreadEnd = Extract<
  PlanThreadMessage,
  { type: "finished" | "input-error" | "storage-unreachable" }
>;

/**
 * Runs the planner thread, handing its messages to `onMessage`, and resolves with how it ended.
 * Aborting `signal` terminates the thread at once (it holds no database state) and rejects.
 */
function runPlanThread(
  input: PlanThreadInput,
  signal: AbortSignal,
  onMessage: (message: PlanThreadMessage) => void,
): Promise<ThreadEnd> {
  return new Promise((resolve, reject) => {
    if (signal.aborted) {
      reject(signal.reason);
      return;
    }
    // No inherited flags (a test runner's, say): the entry registers its own TypeScript loader.
    const thread = new Worker(new URL("./plan-thread-entry.mjs", import.meta.url), {
      workerData: input,
      execArgv: [],
    });
    let settled = false;
    const settle = (finish: () => void) => {
      if (settled) return;
      settled = true;
      signal.removeEventListener("abort", onAbort);
      void thread.terminate();
      finish();
    };
    const onAbort = () => settle(() => reject(signal.reason));
    signal.addEventListener("abort", onAbort);
    thread.on("message", (message: PlanThreadMessage) => {
      if (settled) return;
      switch (message.type) {
        case "finished":
        case "input-error":
        case "storage-unreachable":
          settle(() => resolve(message));
          return;
        case "internal-error":
          settle(() => reject(new Error(`planner thread: ${message.detail}`)));
          return;
        default:
          onMessage(message);
      }
    });
    thread.on("error", (error) => settle(() => reject(error)));
    thread.on("exit", (code) =>
      settle(() => reject(new Error(`planner thread exited (code ${code}) without a result`))),
    );
  });
}
