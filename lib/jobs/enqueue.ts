import "server-only";
import type PgBoss from "pg-boss";
import { ANALYSIS_JOB_POLICY, ANALYSIS_QUEUE, type AnalysisJob } from "./analysis-queue";
import { startBoss } from "./boss";
import { FEDERATED_JOB_POLICY, FEDERATED_QUEUE, type FederatedJob } from "./federated-queue";
import { LAYOUT_PLAN_JOB_POLICY, LAYOUT_PLAN_QUEUE, type LayoutPlanJob } from "./layout-plan-queue";

// One sending pg-boss per server process, kept on globalThis so development reloads reuse it.
const holder = globalThis as typeof globalThis & { partitaBoss?: Promise<PgBoss> };

function sendingBoss(): Promise<PgBoss> {
  holder.partitaBoss ??= startBoss({
    applicationName: "partita-web",
    supervise: false,
    maxConnections: 2,
  }).catch((error: unknown) => {
    // Let the next request try again instead of caching the failure.
    holder.partitaBoss = undefined;
    throw error;
  });
  return holder.partitaBoss;
}

/**
 * Queues an analysis for the workers and returns the job id. The analysis id is the singleton
 * key, so the same analysis can never be queued twice while a job for it waits.
 */
export async function enqueueAnalysis(job: AnalysisJob): Promise<string> {
  const boss = await sendingBoss();
  const jobId = await boss.send(ANALYSIS_QUEUE, job, {
    ...ANALYSIS_JOB_POLICY,
    singletonKey: job.analysisId,
  });
  if (!jobId) throw new Error(`analysis ${job.analysisId} already has a queued job`);
  return jobId;
}

/**
 * Queues the coordinator of a federated analysis whose encoding is ready; the analysis id is the
 * singleton key, so one coordinator at a time works on it: null when one is already queued.
 */
export async function enqueueFederatedAnalysis(job: FederatedJob): Promise<string | null> {
  const boss = await sendingBoss();
  return boss.send(FEDERATED_QUEUE, job, {
    ...FEDERATED_JOB_POLICY,
    singletonKey: job.federatedAnalysisId,
  });
}

/** Queues a layout plan for the workers and returns the job id (the plan id is the singleton key). */
export async function enqueueLayoutPlan(job: LayoutPlanJob): Promise<string> {
  const boss = await sendingBoss();
  const jobId = await boss.send(LAYOUT_PLAN_QUEUE, job, {
    ...LAYOUT_PLAN_JOB_POLICY,
    singletonKey: job.planId,
  });
  if (!jobId) throw new Error(`layout plan ${job.planId} already has a queued job`);
  return jobId;
}

/** Closes this process's sending connection (tests and scripts, so the process can exit). */
export async function stopSendingBoss(): Promise<void> {
  const boss = await holder.partitaBoss?.catch(() => undefined);
  holder.partitaBoss = undefined;
  await boss?.stop({ graceful: false });
}
