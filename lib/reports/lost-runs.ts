import type PgBoss from "pg-boss";
import { handBackLostParts } from "@/db/queries/analysis-parts";
import { handBackLostRuns } from "@/db/queries/analyses";
import { ANALYSIS_JOB_POLICY, ANALYSIS_PART_QUEUE, ANALYSIS_QUEUE } from "@/lib/jobs";

/** Shown on the progress page while a run whose worker died waits to be taken again. */
export const WORKER_LOST_NOTE =
  "The worker running this analysis stopped. The analysis goes back to the queue and will restart shortly; your files are safe.";

/**
 * Finds analyses whose worker stopped sending heartbeats for `staleAfterMs` and hands them back:
 * the analysis becomes queued again, and its pg-boss job is failed at once instead of waiting for
 * its expiry, so pg-boss retries it (after its retry delay) on whichever worker is alive. The
 * report is still stored at most once: the reports table keeps one report per analysis.
 *
 * The parts of analyses shared by several workers are looked after the same way: a part whose
 * worker went quiet is counted as lost (the report says it was redone) and its job failed, so
 * pg-boss gives it to a free worker after a second, or the coordinator's own process takes it.
 */
export async function sweepLostRuns(
  boss: PgBoss,
  settings: { staleAfterMs: number; log(line: string): void },
): Promise<void> {
  const lost = await handBackLostRuns(settings.staleAfterMs, WORKER_LOST_NOTE);
  for (const run of lost) {
    if (run.jobId) {
      await boss.fail(ANALYSIS_QUEUE, run.jobId, { message: "worker stopped sending heartbeats" });
    }
    const job = run.jobId ? await boss.getJobById(ANALYSIS_QUEUE, run.jobId) : null;
    if (job?.state !== "retry") {
      // Its job is gone (retried out, or never recorded): a new one takes its place.
      await boss.send(
        ANALYSIS_QUEUE,
        { analysisId: run.analysisId, workspaceId: run.workspaceId },
        { ...ANALYSIS_JOB_POLICY, singletonKey: run.analysisId },
      );
    }
    settings.log(`analysis ${run.analysisId}: its worker stopped; handed back to the queue`);
  }
  for (const part of await handBackLostParts(settings.staleAfterMs)) {
    if (part.jobId) {
      // The job may have ended already (a part its coordinator took over keeps its old job id).
      await boss
        .fail(ANALYSIS_PART_QUEUE, part.jobId, { message: "worker stopped sending heartbeats" })
        .catch(() => undefined);
    }
    settings.log(
      `analysis ${part.analysisId}: the worker holding part ${part.partIndex + 1} of ${part.partCount} stopped; the part goes to another worker`,
    );
  }
}
