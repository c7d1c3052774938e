// The analysis worker: takes analysis jobs from the pg-boss queue in PostgreSQL and runs them, one
// at a time (the engine keeps a core busy; with two cores the web app keeps the other), runs layout
// plans from their own queue (one at a time, beside the analyses), holds one part of an analysis
// shared by several workers (PARTITA_ANALYSIS_PARTS), and sends the e-mail waiting in the outbox.
// Start as many as you like, on one machine or several, with the same DATABASE_URL and S3_*
// configuration: pg-boss hands each job to exactly one of them, and any of them retries a crashed
// worker's job.
//
//   node --conditions=react-server --import tsx scripts/worker.ts
//
// (`npm start` and `npm test` start one.) SIGINT or SIGTERM stops it: a run in progress is
// interrupted and its job handed back to the queue for another worker or the next start.
import type PgBoss from "pg-boss";
import { closeDb } from "@/db/client";
import {
  ANALYSIS_PART_JOB_POLICY,
  ANALYSIS_PART_QUEUE,
  ANALYSIS_QUEUE,
  analysisJobSchema,
  analysisPartJobSchema,
  FEDERATED_QUEUE,
  federatedJobSchema,
  LAYOUT_PLAN_QUEUE,
  layoutPlanJobSchema,
  startBoss,
  type AnalysisJob,
  type AnalysisPartJob,
  type FederatedJob,
  type LayoutPlanJob,
} from "@/lib/jobs";
import { sweepLostCoordinators } from "@/lib/federated/lost-coordinators";
import { runFederatedCoordinator } from "@/lib/federated/run-coordinator";
import { runLayoutPlan } from "@/lib/layout-plans/run-layout-plan";
import { runMailSender } from "@/lib/mail";
import { env } from "@/lib/env";
import { sweepLostRuns } from "@/lib/reports/lost-runs";
import { runAnalysis } from "@/lib/reports/run-analysis";
import { runAnalysisPart } from "@/lib/reports/run-analysis-part";

const shutdown = new AbortController();

function log(line: string) {
  console.log(`[worker] ${line}`);
}

async function handleJob(boss: PgBoss, job: PgBoss.JobWithMetadata<AnalysisJob>): Promise<void> {
  const parsed = analysisJobSchema.safeParse(job.data);
  if (!parsed.success) {
    // Retrying a malformed job would fail the same way; completing it keeps the queue moving.
    log(`job ${job.id}: not an analysis job, skipped`);
    return;
  }
  const { analysisId } = parsed.data;
  const attempt = `attempt ${job.retryCount + 1} of ${job.retryLimit + 1}`;
  const started = performance.now();
  const elapsed = () => `${((performance.now() - started) / 1000).toFixed(1)} s`;
  try {
    const result = await runAnalysis(parsed.data, {
      willRetry: job.retryCount < job.retryLimit,
      // Past its expiry pg-boss has failed the job while the run went on: it is no longer active.
      // When the queue cannot be asked, the job counts as held, as before this question existed.
      jobStillHeld: () =>
        boss.getJobById(ANALYSIS_QUEUE, job.id).then(
          (current) => current?.state === "active",
          () => true,
        ),
      signal: shutdown.signal,
      parts: {
        parts: env().PARTITA_ANALYSIS_PARTS,
        minBytes: env().PARTITA_PARTS_MIN_BYTES,
        sendPart: (part) =>
          boss.send(ANALYSIS_PART_QUEUE, part, {
            ...ANALYSIS_PART_JOB_POLICY,
            singletonKey: `${part.runId}:${part.partIndex}`,
          }),
        heartbeatMs: env().WORKER_HEARTBEAT_MS,
        staleAfterMs: env().WORKER_STALE_AFTER_MS,
        log,
      },
    });
    const detail = result.outcome === "succeeded" ? ` (report ${result.reportId})` : "";
    log(`analysis ${analysisId}, ${attempt}: ${result.outcome}${detail} in ${elapsed()}`);
  } catch (error) {
    const next = job.retryCount < job.retryLimit ? "will be retried" : "failed for good";
    log(`analysis ${analysisId}, ${attempt}: stopped after ${elapsed()}, ${next}`);
    throw error;
  }
}

/**
 * One part of an analysis shared by several workers. A worker holds one part at a time, so the
 * parts of one analysis spread over the workers; a part nobody is free to take is run by its
 * analysis's coordinator (lib/reports/analysis-in-parts.ts).
 */
async function handlePartJob(job: PgBoss.JobWithMetadata<AnalysisPartJob>): Promise<void> {
  const parsed = analysisPartJobSchema.safeParse(job.data);
  if (!parsed.success) {
    log(`job ${job.id}: not an analysis part job, skipped`);
    return;
  }
  await runAnalysisPart(parsed.data, {
    jobId: job.id,
    signal: shutdown.signal,
    handBackOnAbort: true,
    heartbeatMs: env().WORKER_HEARTBEAT_MS,
    staleAfterMs: env().WORKER_STALE_AFTER_MS,
    willRetry: job.retryCount < job.retryLimit,
    log,
  });
}

/**
 * Coordinators a worker runs at once. A coordinator mostly waits for its clients' answers, so
 * several share a worker without taking cores from the analyses.
 */
const FEDERATED_COORDINATORS = 4;

async function handleFederatedJob(job: PgBoss.JobWithMetadata<FederatedJob>): Promise<void> {
  const parsed = federatedJobSchema.safeParse(job.data);
  if (!parsed.success) {
    log(`job ${job.id}: not a federated job, skipped`);
    return;
  }
  const { federatedAnalysisId } = parsed.data;
  const result = await runFederatedCoordinator(federatedAnalysisId, {
    signal: shutdown.signal,
    willRetry: job.retryCount < job.retryLimit,
    jobId: job.id,
    heartbeatMs: env().WORKER_HEARTBEAT_MS,
  });
  const detail = result.outcome === "succeeded" ? ` (report ${result.reportId})` : "";
  log(`federated analysis ${federatedAnalysisId}: ${result.outcome}${detail}`);
}

async function handlePlanJob(job: PgBoss.JobWithMetadata<LayoutPlanJob>): Promise<void> {
  const parsed = layoutPlanJobSchema.safeParse(job.data);
  if (!parsed.success) {
    log(`job ${job.id}: not a layout plan job, skipped`);
    return;
  }
  const { planId } = parsed.data;
  const started = performance.now();
  const elapsed = () => `${((performance.now() - started) / 1000).toFixed(1)} s`;
  try {
    const result = await runLayoutPlan(parsed.data, {
      willRetry: job.retryCount < job.retryLimit,
      signal: shutdown.signal,
    });
    const detail =
      result.outcome === "succeeded" ? ` (${result.scored} scored, ${result.failed} failed)` : "";
    log(`layout plan ${planId}: ${result.outcome}${detail} in ${elapsed()}`);
  } catch (error) {
    log(`layout plan ${planId}: stopped after ${elapsed()}`);
    throw error;
  }
}

async function main() {
  const boss = await startBoss({
    applicationName: "partita-worker",
    supervise: true,
    maxConnections: 3,
  });
  // E-mail queued by the app (the outbox in PostgreSQL) goes out from here, beside the analyses.
  const mailSender = runMailSender({
    pollMs: 1000,
    signal: shutdown.signal,
    log: (line) => console.log(`[mail] ${line}`),
  });
  // Every worker looks for runs and coordinators whose worker died (no heartbeat), so one
  // survivor is enough.
  const sweep = () => {
    const settings = { staleAfterMs: env().WORKER_STALE_AFTER_MS, log };
    return Promise.all([
      sweepLostRuns(boss, settings),
      sweepLostCoordinators(boss, settings),
    ]).catch((error: unknown) =>
      log(`could not look for lost runs: ${error instanceof Error ? error.message : error}`),
    );
  };
  const sweeper = setInterval(() => void sweep(), env().WORKER_HEARTBEAT_MS);
  void sweep();
  let stopping = false;
  const stop = async (signal: string) => {
    if (stopping) return;
    stopping = true;
    log(`${signal}: stopping`);
    shutdown.abort();
    clearInterval(sweeper);
    await Promise.all([boss.stop({ graceful: true, timeout: 10_000 }), mailSender]);
    await closeDb();
    process.exit(0);
  };
  process.on("SIGINT", () => void stop("SIGINT"));
  process.on("SIGTERM", () => void stop("SIGTERM"));

  await boss.work<AnalysisJob>(
    ANALYSIS_QUEUE,
    { includeMetadata: true, batchSize: 1, pollingIntervalSeconds: 1 },
    async ([job]) => handleJob(boss, job),
  );
  for (let k = 0; k < FEDERATED_COORDINATORS; k++) {
    await boss.work<FederatedJob>(
      FEDERATED_QUEUE,
      { includeMetadata: true, batchSize: 1, pollingIntervalSeconds: 1 },
      async ([job]) => handleFederatedJob(job),
    );
  }
  await boss.work<AnalysisPartJob>(
    ANALYSIS_PART_QUEUE,
    { includeMetadata: true, batchSize: 1, pollingIntervalSeconds: 1 },
    async ([job]) => handlePartJob(job),
  );
  await boss.work<LayoutPlanJob>(
    LAYOUT_PLAN_QUEUE,
    { includeMetadata: true, batchSize: 1, pollingIntervalSeconds: 1 },
    async ([job]) => handlePlanJob(job),
  );
  log(
    `ready: taking jobs from queues "${ANALYSIS_QUEUE}", "${ANALYSIS_PART_QUEUE}", "${FEDERATED_QUEUE}" and "${LAYOUT_PLAN_QUEUE}"`,
  );
}

main().catch((error: unknown) => {
  console.error(`[worker] could not start: ${error instanceof Error ? error.message : error}`);
  process.exit(1);
});
