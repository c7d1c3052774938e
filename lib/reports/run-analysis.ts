import {
  claimAnalysis,
  endRunUnsuccessfully,
  findAnalysisStatus,
  recordRowsSpilled,
  type AnalysisInputFile,
} from "@/db/queries/analyses";
import { storeReport } from "@/db/queries/report-store";
import { env } from "@/lib/env";
import { ANALYSIS_JOB_POLICY, type AnalysisJob } from "@/lib/jobs";
import { notifyAnalysisEnded, type EndedRun } from "@/lib/notifications/analysis-ended";
import { partCountFor, runAnalysisInParts, type PartsSettings } from "./analysis-in-parts";
import { runEngineInThread } from "./engine-thread";
import type { StoredFile } from "./hashed-object";
import { createProgressWriter } from "./progress-writer";
import { retryWhileStorageUnreachable } from "./storage-retry";
import { startHeartbeat } from "./worker-heartbeat";

export type RunOutcome =
  | { outcome: "succeeded"; reportId: string }
  /** Bad input: the analysis failed with the engine's message; retrying would not help. */
  | { outcome: "failed"; message: string }
  | { outcome: "cancelled" }
  /** Nothing to do: the analysis was already finished or cancelled when the job arrived. */
  | { outcome: "skipped" };

export interface RunOptions {
  /** Whether the job will be tried again if this run throws; decides how an internal error ends. */
  willRetry: boolean;
  /**
   * Asked when a run ends in an error: false when the queue no longer holds the job for this run
   * (it expired under a long run, for instance one waiting for storage), so no retry of it will
   * come and "queued" would wait forever. The worker asks pg-boss; without it the job counts as held.
   */
  jobStillHeld?: () => Promise<boolean>;
  /** Aborted when the worker shuts down: the run stops and its job is handed back to the queue. */
  signal?: AbortSignal;
  /** At least this long between progress writes; 500 ms keeps it to two writes a second. */
  progressIntervalMs?: number;
  /** Sharing a large analysis among workers (analysis-in-parts.ts); absent: one process. */
  parts?: PartsSettings;
}

const INTERNAL_FAILURE =
  "The analysis stopped because of an internal error, not because of your files. It was tried several times; please run it again later.";
const STORAGE_FAILURE =
  "Storage could not be reached for as long as Partita waits for it, so the analysis stopped. Your files are kept; run it again once storage is back.";
const EXPIRED_FAILURE = `The analysis ran longer than one attempt may (${ANALYSIS_JOB_POLICY.expireInSeconds / 60} minutes, waiting for storage included) and was then interrupted, so it stopped. Your files are kept; run it again.`;
const INTERNAL_RETRY =
  "The analysis was interrupted (an internal error or a worker restart, not a problem with your files). It will be tried again shortly.";

function storedFile(file: AnalysisInputFile): StoredFile {
  return { kind: file.kind, name: file.name, objectKey: file.objectKey, sizeBytes: file.sizeBytes };
}

/**
 * One run of an analysis job, from claiming the analysis to storing its report. Framework-free so
 * the worker process and the tests call it the same way.
 *
 * - Bad input (AnalysisInputError) fails the analysis with the engine's message and resolves: the
 *   job completes, since a retry would read the same files.
 * - A cancellation seen during the run stops the engine and resolves "cancelled".
 * - Anything else — an internal error, or the worker shutting down (`options.signal`) — is logged
 *   here (never shown to users), the analysis goes back to "queued", or to "failed" on the last
 *   attempt or when the job expired under the run (nothing would retry it), and the error is
 *   rethrown so the queue retries the job.
 */
export async function runAnalysis(job: AnalysisJob, options: RunOptions): Promise<RunOutcome> {
  const started = performance.now();
  const settings = env();
  const analysis = await claimAnalysis(
    job.workspaceId,
    job.analysisId,
    settings.WORKER_STALE_AFTER_MS,
  );
  if (!analysis) return { outcome: "skipped" };

  // A long run e-mails whoever started it at the end (lib/notifications/analysis-ended.ts).
  const notifyEnded = (run: EndedRun) =>
    notifyAnalysisEnded({
      ...job,
      title: analysis.title,
      startedBy: analysis.createdBy,
      seconds: (performance.now() - started) / 1000,
      run,
    });

  const stoppedFromOutside = new AbortController();
  const signal = options.signal
    ? AbortSignal.any([stoppedFromOutside.signal, options.signal])
    : stoppedFromOutside.signal;
  const progress = createProgressWriter(job, {
    intervalMs: options.progressIntervalMs ?? 500,
    pollMs: 1000,
    onStopped: () => stoppedFromOutside.abort(),
  });
  const stopHeartbeat = startHeartbeat(job, settings.WORKER_HEARTBEAT_MS);
  const partCount = options.parts ? partCountFor(analysis, options.parts) : 1;
  const runInParts = () =>
    partCount > 1
      ? runAnalysisInParts(analysis, partCount, options.parts!, {
          signal,
          onProgress: (value) => progress.report(value),
        })
      : Promise.resolve(null);
  const runEngine = async () =>
    (await runInParts()) ??
    runEngineInThread(
      {
        dataset: storedFile(analysis.dataset),
        layout: analysis.layout && storedFile(analysis.layout),
        weights: analysis.weights && storedFile(analysis.weights),
        options: analysis.parameters,
        memory: {
          limitBytes: settings.PARTITA_MEMORY_LIMIT,
          scratchDirectory: settings.PARTITA_SCRATCH_DIR,
        },
      },
      {
        onProgress: (value) => progress.report(value),
        onSimulationProgress: (value) => progress.reportSimulation(value),
        signal,
      },
    );
  try {
    const result = await retryWhileStorageUnreachable(job, runEngine, {
      windowMs: settings.STORAGE_RETRY_WINDOW_MS,
      signal,
    });
    await progress.stop();
    if (result.type === "storage-gave-up") {
      await endRunUnsuccessfully(job.workspaceId, job.analysisId, {
        status: "failed",
        message: STORAGE_FAILURE,
      });
      await notifyEnded({ outcome: "failed", message: STORAGE_FAILURE });
      return { outcome: "failed", message: STORAGE_FAILURE };
    }
    if (result.type === "input-error") {
      await endRunUnsuccessfully(job.workspaceId, job.analysisId, {
        status: "failed",
        message: result.message,
      });
      await notifyEnded({ outcome: "failed", message: result.message });
      return { outcome: "failed", message: result.message };
    }
    if (result.spilledAtLimit !== null) {
      await recordRowsSpilled(job.workspaceId, job.analysisId, result.spilledAtLimit);
    }
    const stored = await storeReport({
      ...job,
      summary: result.summary,
      inputs: result.inputs,
      timings: { ...result.stageSeconds, total: (performance.now() - started) / 1000 },
    });
    if (stored.stored) {
      await notifyEnded({ outcome: "succeeded", reportId: stored.reportId });
      return { outcome: "succeeded", reportId: stored.reportId };
    }
    return stored.status === "cancelled" ? { outcome: "cancelled" } : { outcome: "skipped" };
  } catch (error) {
    await progress.stop();
    if (stoppedFromOutside.signal.aborted) {
      const status = await findAnalysisStatus(job.workspaceId, job.analysisId);
      return status?.status === "cancelled" ? { outcome: "cancelled" } : { outcome: "skipped" };
    }
    if (options.signal?.aborted) {
      console.warn(`[analysis ${job.analysisId}] interrupted: the worker is stopping`);
    } else {
      console.error(
        `[analysis ${job.analysisId}] run failed:`,
        error instanceof Error ? (error.stack ?? error.message) : error,
      );
    }
    const jobExpired = options.willRetry && !(await (options.jobStillHeld?.() ?? true));
    const retried = options.willRetry && !jobExpired;
    const failure = jobExpired ? EXPIRED_FAILURE : INTERNAL_FAILURE;
    await endRunUnsuccessfully(job.workspaceId, job.analysisId, {
      status: retried ? "queued" : "failed",
      message: retried ? INTERNAL_RETRY : failure,
    });
    if (!retried) await notifyEnded({ outcome: "failed", message: failure });
    throw error;
  } finally {
    stopHeartbeat();
  }
}
