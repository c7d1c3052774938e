import type PgBoss from "pg-boss";
import { handBackLostParts } from "@/db/queries/analysis-parts";
import { handBackLostRuns } from "@/db/queries/analyses";
import { handBackLostPlans } from "@/db/queries/layout-plans";
import {
  ANALYSIS_JOB_POLICY,
  ANALYSIS_PART_QUEUE,
  ANALYSIS_QUEUE,
  LAYOUT_PLAN_JOB_POLICY,
  LAYOUT_PLAN_QUEUE,
} from "@/lib/jobs";

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
 * So are layout plans: a plan whose worker went quiet is queued again, and its retry goes on from
 * the candidates already scored.
 */
export async function sweepLostRuns(
  boss: PgBoss,
  settings: { staleAfterMs: number; log(line: string): void },
): Promise<void> {
  for (const run of await handBackLostRuns(settings.staleAfterMs, WORKER_LOST_NOTE)) {
    await retryLostJob(boss, ANALYSIS_QUEUE, run.jobId, {
      data: { analysisId: run.analysisId, workspaceId: run.workspaceId },
      options: { ...ANALYSIS_JOB_POLICY, singletonKey: run.analysisId },
    });
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
  for (const plan of await handBackLostPlans(settings.staleAfterMs)) {
    await retryLostJob(boss, LAYOUT_PLAN_QUEUE, plan.jobId, {
      data: { planId: plan.planId, workspaceId: plan.workspaceId },
      options: { ...LAYOUT_PLAN_JOB_POLICY, singletonKey: plan.planId },
    });
    settings.log(`layout plan ${plan.planId}: its worker stopped; handed back to the queue`);
  }
}

/**
 * Fails the job of a run whose worker died, at once instead of at its expiry, so pg-boss retries it
 * on a live worker; when its job is gone (retried out, or never recorded) a new one takes its place.
 */
async function retryLostJob(
  boss: PgBoss,
  queue: string,
  jobId: string | null,
  replacement: { data: object; options: PgBoss.SendOptions },
): Promise<void> {
  if (jobId) await boss.fail(queue, jobId, { message: "worker stopped sending heartbeats" });
  const job = jobId ? await boss.getJobById(queue, jobId) : null;
  if (job?.state !== "retry") await boss.send(queue, replacement.data, replacement.options);
}
