import PgBoss from "pg-boss";
import { env } from "@/lib/env";
import { ANALYSIS_PART_JOB_POLICY, ANALYSIS_PART_QUEUE } from "./analysis-part-queue";
import { ANALYSIS_JOB_POLICY, ANALYSIS_QUEUE } from "./analysis-queue";
import { FEDERATED_JOB_POLICY, FEDERATED_QUEUE } from "./federated-queue";
import { LAYOUT_PLAN_JOB_POLICY, LAYOUT_PLAN_QUEUE } from "./layout-plan-queue";

export interface BossOptions {
  /** Shown in pg_stat_activity, e.g. "partita-worker". */
  applicationName: string;
  /**
   * Run pg-boss's maintenance (expiring jobs of crashed workers, archiving, deleting) from this
   * process. Workers do; the web app only sends jobs.
   */
  supervise: boolean;
  /** Connections in pg-boss's own pool. */
  maxConnections: number;
}

/**
 * A started pg-boss on DATABASE_URL, with its tables in its own `pgboss` schema (created or
 * migrated on first start) and the analysis, analysis part, federated and layout plan queues in
 * place. All are "stately": at most one queued and one active job per singleton key, and every
 * job's key is its analysis's or plan's id (a part's: its run and index).
 */
export async function startBoss(options: BossOptions): Promise<PgBoss> {
  const boss = new PgBoss({
    connectionString: env().DATABASE_URL,
    application_name: options.applicationName,
    max: options.maxConnections,
    supervise: options.supervise,
    schedule: false,
  });
  // pg-boss reports connection trouble as events; without a listener Node would crash on them.
  boss.on("error", (error) => console.error(`[pg-boss] ${error.message}`));
  await boss.start();
  // Creating an existing queue does nothing, so every process may do it.
  await boss.createQueue(ANALYSIS_QUEUE, {
    name: ANALYSIS_QUEUE,
    policy: "stately",
    ...ANALYSIS_JOB_POLICY,
  });
  await boss.createQueue(ANALYSIS_PART_QUEUE, {
    name: ANALYSIS_PART_QUEUE,
    policy: "stately",
    ...ANALYSIS_PART_JOB_POLICY,
  });
  await boss.createQueue(FEDERATED_QUEUE, {
    name: FEDERATED_QUEUE,
    policy: "stately",
    ...FEDERATED_JOB_POLICY,
  });
  await boss.createQueue(LAYOUT_PLAN_QUEUE, {
    name: LAYOUT_PLAN_QUEUE,
    policy: "stately",
    ...LAYOUT_PLAN_JOB_POLICY,
  });
  return boss;
}
