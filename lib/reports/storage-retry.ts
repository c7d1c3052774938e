import { clearStorageUnreachable, recordStorageUnreachable } from "@/db/queries/analyses";
import type { AnalysisJob } from "@/lib/jobs";
import { pause } from "@/lib/pause";
import { StorageUnreachableError } from "./engine-thread";

/** Waits between attempts: 5 s, doubling, at most a minute. */
const firstWaitMs = 5_000;
const longestWaitMs = 60_000;

/**
 * Runs `attempt` (the engine reading its inputs from storage) and, while it fails because storage
 * does not answer, runs it again with backoff until `windowMs` has passed since the first such
 * failure. Meanwhile the analysis records since when storage has been unreachable, which the
 * progress page shows; it is cleared once an attempt gets through. Resolves with the attempt's
 * result, or `storage-gave-up` when the window ran out. Other errors pass straight through.
 */
export async function retryWhileStorageUnreachable<T>(
  job: AnalysisJob,
  attempt: () => Promise<T>,
  settings: { windowMs: number; signal: AbortSignal },
): Promise<T | { type: "storage-gave-up" }> {
  let waitMs = firstWaitMs;
  let waiting = false;
  for (;;) {
    try {
      const result = await attempt();
      if (waiting) await clearStorageUnreachable(job.workspaceId, job.analysisId);
      return result;
    } catch (error) {
      if (!(error instanceof StorageUnreachableError) || settings.signal.aborted) throw error;
      const since = await recordStorageUnreachable(job.workspaceId, job.analysisId);
      // Undefined: the analysis stopped running meanwhile (cancelled); nothing to wait for.
      if (!since) throw error;
      waiting = true;
      const left = since.getTime() + settings.windowMs - Date.now();
      if (left <= 0) return { type: "storage-gave-up" };
      console.warn(
        `[analysis ${job.analysisId}] ${error.message}; trying again in ${Math.round(Math.min(waitMs, left) / 1000)} s`,
      );
      await pause(Math.min(waitMs, left), settings.signal);
      waitMs = Math.min(longestWaitMs, waitMs * 2);
    }
  }
}
