import "server-only";
import { and, asc, desc, eq, exists, inArray, isNull, or, sql } from "drizzle-orm";
import { db } from "@/db/client";
import { dataFiles, layoutCandidates, layoutPlans } from "@/db/schema";
import {
  describeLayoutParameters,
  nameLayout,
  type PartitionSummary,
} from "@/lib/analysis/browser";
import type { LayoutPlanRequest } from "@/lib/validation/layout-plan";
import { findInputFiles, type AnalysisInputFile } from "./analyses";

// Every function here takes the workspace id and filters by it (candidates through their plan), so
// no caller can reach another workspace's plans, whatever id it was handed.

export type LayoutPlan = typeof layoutPlans.$inferSelect;
export type LayoutPlanStatus = LayoutPlan["status"];
export type LayoutCandidateRow = typeof layoutCandidates.$inferSelect;

/** A plan with its candidates in the plan's order, as the pages and the API show it. */
export type LayoutPlanView = LayoutPlan & {
  datasetName: string;
  candidates: LayoutCandidateRow[];
};

/** Records a requested plan and its candidates, queued; the caller checked the dataset's workspace. */
export async function insertLayoutPlan(
  workspaceId: string,
  createdBy: string,
  request: LayoutPlanRequest,
): Promise<string> {
  return db().transaction(async (tx) => {
    const [plan] = await tx
      .insert(layoutPlans)
      .values({
        workspaceId,
        createdBy,
        title: request.title,
        datasetFileId: request.datasetFileId,
        options: request.options,
        groupColumn: request.groupColumn ?? null,
        shardCount: request.shardCount,
        generators: request.generators,
        seed: request.seed,
      })
      .returning({ id: layoutPlans.id });
    await tx.insert(layoutCandidates).values(
      request.generators.map((spec, ordinal) => ({
        planId: plan.id,
        ordinal,
        name: nameLayout(spec),
        generator: spec.generator,
        parameters: describeLayoutParameters(spec),
      })),
    );
    return plan.id;
  });
}

export async function setLayoutPlanJobId(workspaceId: string, planId: string, jobId: string) {
  await db()
    .update(layoutPlans)
    .set({ jobId })
    .where(and(eq(layoutPlans.workspaceId, workspaceId), eq(layoutPlans.id, planId)));
}

/** Removes a plan whose job could not be queued, so no plan waits for a job that never comes. */
export async function deleteUnqueuedLayoutPlan(workspaceId: string, planId: string) {
  await db()
    .delete(layoutPlans)
    .where(
      and(
        eq(layoutPlans.workspaceId, workspaceId),
        eq(layoutPlans.id, planId),
        sql`${layoutPlans.jobId} is null`,
      ),
    );
}

/** The workspace's plans, newest first, with how many candidates are done. */
export async function listLayoutPlans(workspaceId: string) {
  return db()
    .select({
      id: layoutPlans.id,
      title: layoutPlans.title,
      status: layoutPlans.status,
      shardCount: layoutPlans.shardCount,
      createdAt: layoutPlans.createdAt,
      datasetName: dataFiles.name,
      candidates: sql<number>`(select count(*)::int from ${layoutCandidates} where ${layoutCandidates.planId} = ${layoutPlans.id})`,
      scored: sql<number>`(select count(*)::int from ${layoutCandidates} where ${layoutCandidates.planId} = ${layoutPlans.id} and ${layoutCandidates.status} = 'succeeded')`,
    })
    .from(layoutPlans)
    .innerJoin(dataFiles, eq(dataFiles.id, layoutPlans.datasetFileId))
    .where(eq(layoutPlans.workspaceId, workspaceId))
    .orderBy(desc(layoutPlans.createdAt))
    .limit(100);
}

/** One plan of this workspace with its candidates, or undefined. */
export async function findLayoutPlan(
  workspaceId: string,
  planId: string,
): Promise<LayoutPlanView | undefined> {
  const [plan] = await db()
    .select({ plan: layoutPlans, datasetName: dataFiles.name })
    .from(layoutPlans)
    .innerJoin(dataFiles, eq(dataFiles.id, layoutPlans.datasetFileId))
    .where(and(eq(layoutPlans.workspaceId, workspaceId), eq(layoutPlans.id, planId)));
  if (!plan) return undefined;
  const candidates = await db()
    .select()
    .from(layoutCandidates)
    .where(eq(layoutCandidates.planId, planId))
    .orderBy(asc(layoutCandidates.ordinal));
  return { ...plan.plan, datasetName: plan.datasetName, candidates };
}

/** What a plan's progress is read from: the plan's and its candidates' states, no summaries. */
export interface LayoutPlanProgressView {
  title: string;
  status: LayoutPlan["status"];
  stage: string | null;
  fraction: number;
  failureMessage: string | null;
  candidates: Pick<
    LayoutPlanView["candidates"][number],
    "ordinal" | "name" | "status" | "fraction" | "failureMessage"
  >[];
}

/**
 * One plan's progress, polled every second while it runs: only the state columns, since the
 * candidates' stored summaries (up to 1,000 shards each) are what findLayoutPlan spends its time on.
 */
export async function findLayoutPlanProgress(
  workspaceId: string,
  planId: string,
): Promise<LayoutPlanProgressView | undefined> {
  const [plan] = await db()
    .select({
      title: layoutPlans.title,
      status: layoutPlans.status,
      stage: layoutPlans.stage,
      fraction: layoutPlans.fraction,
      failureMessage: layoutPlans.failureMessage,
    })
    .from(layoutPlans)
    .where(and(eq(layoutPlans.workspaceId, workspaceId), eq(layoutPlans.id, planId)));
  if (!plan) return undefined;
  const candidates = await db()
    .select({
      ordinal: layoutCandidates.ordinal,
      name: layoutCandidates.name,
      status: layoutCandidates.status,
      fraction: layoutCandidates.fraction,
      failureMessage: layoutCandidates.failureMessage,
    })
    .from(layoutCandidates)
    .where(eq(layoutCandidates.planId, planId))
    .orderBy(asc(layoutCandidates.ordinal));
  return { ...plan, candidates };
}

/**
 * A claimed plan, the dataset it reads, and the ordinals of candidates an earlier run of its job
 * already finished (scored or failed), which are not run again.
 */
export type ClaimedLayoutPlan = LayoutPlan & {
  dataset: AnalysisInputFile;
  finishedOrdinals: number[];
};

/** A running plan whose worker sent no heartbeat for `staleAfterMs` (it died). */
function isLostPlan(staleAfterMs: number) {
  return and(
    eq(layoutPlans.status, "running"),
    sql`coalesce(${layoutPlans.heartbeatAt}, ${layoutPlans.startedAt}) < now() - make_interval(secs => ${staleAfterMs / 1000})`,
  );
}

/**
 * Marks a queued plan running and returns it with its dataset; undefined when it was cancelled or
 * is held by a live worker. A plan left running by a worker that died (no heartbeat for
 * `staleAfterMs`) is taken too, so the job's retry goes on from the candidates already scored.
 */
export async function claimLayoutPlan(
  workspaceId: string,
  planId: string,
  staleAfterMs: number,
): Promise<ClaimedLayoutPlan | undefined> {
  const [claimed] = await db()
    .update(layoutPlans)
    .set({
      status: "running",
      startedAt: sql`now()`,
      heartbeatAt: sql`now()`,
      stage: null,
      fraction: 0,
    })
    .where(
      and(
        eq(layoutPlans.workspaceId, workspaceId),
        eq(layoutPlans.id, planId),
        or(eq(layoutPlans.status, "queued"), isLostPlan(staleAfterMs)),
      ),
    )
    .returning();
  if (!claimed) return undefined;
  const [dataset] = await findInputFiles(workspaceId, [claimed.datasetFileId]);
  if (!dataset) throw new Error(`layout plan ${planId}: its dataset file is missing`);
  // The candidate an earlier run was scoring starts over; the finished ones stay as they are.
  await db()
    .update(layoutCandidates)
    .set({ status: "queued", stage: null, fraction: 0, failureMessage: null, finishedAt: null })
    .where(and(eq(layoutCandidates.planId, planId), inArray(layoutCandidates.status, ["running"])));
  const finished = await db()
    .select({ ordinal: layoutCandidates.ordinal })
    .from(layoutCandidates)
    .where(
      and(
        eq(layoutCandidates.planId, planId),
        inArray(layoutCandidates.status, ["succeeded", "failed"]),
      ),
    )
    .orderBy(asc(layoutCandidates.ordinal));
  return { ...claimed, dataset, finishedOrdinals: finished.map((row) => row.ordinal) };
}

const planIs = (workspaceId: string, planId: string) =>
  and(eq(layoutPlans.workspaceId, workspaceId), eq(layoutPlans.id, planId));

/** The plan, in its workspace, while a worker scores it: every write of a run checks this. */
const planRunning = (workspaceId: string, planId: string) =>
  and(planIs(workspaceId, planId), eq(layoutPlans.status, "running"));

/** The plan's candidates that have not ended, which end with the plan. */
const unfinishedCandidates = (planId: string) =>
  and(eq(layoutCandidates.planId, planId), inArray(layoutCandidates.status, ["queued", "running"]));

/** Stores the shared stage's progress; false when the plan is no longer running (cancelled). */
export async function recordLayoutPlanProgress(
  workspaceId: string,
  planId: string,
  progress: { stage: string; fraction: number },
): Promise<boolean> {
  const rows = await db()
    .update(layoutPlans)
    .set(progress)
    .where(planRunning(workspaceId, planId))
    .returning({ id: layoutPlans.id });
  return rows.length > 0;
}

/** Records that a worker still runs the plan; false when it is no longer running (cancelled). */
export async function recordLayoutPlanHeartbeat(
  workspaceId: string,
  planId: string,
): Promise<boolean> {
  const rows = await db()
    .update(layoutPlans)
    .set({ heartbeatAt: sql`now()` })
    .where(planRunning(workspaceId, planId))
    .returning({ id: layoutPlans.id });
  return rows.length > 0;
}

/**
 * Hands every plan whose worker died (no heartbeat for `staleAfterMs`) back to the queue and
 * returns them with their jobs. Across all workspaces: this is the workers' housekeeping, not a
 * user's request.
 */
export async function handBackLostPlans(staleAfterMs: number) {
  return db()
    .update(layoutPlans)
    .set({ status: "queued", heartbeatAt: null })
    .where(isLostPlan(staleAfterMs))
    .returning({
      planId: layoutPlans.id,
      workspaceId: layoutPlans.workspaceId,
      jobId: layoutPlans.jobId,
    });
}

/**
 * Updates one candidate of a running plan: its progress, or its end (summary and map, or a failure
 * message). The plan's workspace and running state are checked in the same statement.
 */
export async function updateLayoutCandidate(
  workspaceId: string,
  planId: string,
  ordinal: number,
  values: Partial<
    Pick<
      LayoutCandidateRow,
      | "status"
      | "stage"
      | "fraction"
      | "failureMessage"
      | "failedOnInput"
      | "mapObjectKey"
      | "mapSizeBytes"
    >
  > & { summary?: PartitionSummary; finished?: boolean },
): Promise<void> {
  const { finished, ...columns } = values;
  await db()
    .update(layoutCandidates)
    .set({ ...columns, ...(finished && { finishedAt: sql`now()` }) })
    .where(
      and(
        eq(layoutCandidates.planId, planId),
        eq(layoutCandidates.ordinal, ordinal),
        exists(
          db()
            .select({ id: layoutPlans.id })
            .from(layoutPlans)
            .where(planRunning(workspaceId, planId)),
        ),
      ),
    );
}

/**
 * Ends a running plan. Candidates not yet finished end with it: cancelled with a cancelled plan,
 * failed (with the plan's message) otherwise.
 */
export async function endLayoutPlan(
  workspaceId: string,
  planId: string,
  end: { status: "succeeded" | "failed" | "queued"; message?: string },
): Promise<void> {
  await db().transaction(async (tx) => {
    const rows = await tx
      .update(layoutPlans)
      .set({
        status: end.status,
        failureMessage: end.message ?? null,
        finishedAt: end.status === "queued" ? null : sql`now()`,
        fraction: end.status === "succeeded" ? 1 : layoutPlans.fraction,
      })
      .where(planRunning(workspaceId, planId))
      .returning({ id: layoutPlans.id });
    if (rows.length === 0 || end.status === "queued") return;
    await tx
      .update(layoutCandidates)
      .set({ status: "failed", failureMessage: end.message ?? null, finishedAt: sql`now()` })
      .where(unfinishedCandidates(planId));
  });
}

/**
 * Cancels a queued or running plan and its unfinished candidates; the worker notices and stops.
 * Returns false when the plan had already ended.
 */
export async function cancelLayoutPlan(workspaceId: string, planId: string): Promise<boolean> {
  return db().transaction(async (tx) => {
    const rows = await tx
      .update(layoutPlans)
      .set({ status: "cancelled", finishedAt: sql`now()` })
      .where(and(planIs(workspaceId, planId), inArray(layoutPlans.status, ["queued", "running"])))
      .returning({ id: layoutPlans.id });
    if (rows.length === 0) return false;
    await tx
      .update(layoutCandidates)
      .set({ status: "cancelled", finishedAt: sql`now()` })
      .where(unfinishedCandidates(planId));
    return true;
  });
}

/** A scored candidate of a plan in this workspace: its stored map and the file it became, if any. */
export async function findScoredCandidate(
  workspaceId: string,
  planId: string,
  ordinal: number,
): Promise<{ name: string; mapObjectKey: string; mapFileId: string | null } | undefined> {
  const [row] = await db()
    .select({
      name: layoutCandidates.name,
      mapObjectKey: layoutCandidates.mapObjectKey,
      mapFileId: layoutCandidates.mapFileId,
    })
    .from(layoutCandidates)
    .innerJoin(layoutPlans, eq(layoutPlans.id, layoutCandidates.planId))
    .where(
      and(
        planIs(workspaceId, planId),
        eq(layoutCandidates.ordinal, ordinal),
        eq(layoutCandidates.status, "succeeded"),
      ),
    );
  if (!row || row.mapObjectKey === null) return undefined;
  return { ...row, mapObjectKey: row.mapObjectKey };
}

/**
 * Records the layout file a candidate's map was registered as; the first one recorded stays (two
 * at once: the later is told the earlier's). Returns the candidate's file.
 */
export async function linkCandidateMapFile(
  workspaceId: string,
  planId: string,
  ordinal: number,
  fileId: string,
): Promise<string> {
  const where = and(
    inArray(
      layoutCandidates.planId,
      db().select({ id: layoutPlans.id }).from(layoutPlans).where(planIs(workspaceId, planId)),
    ),
    eq(layoutCandidates.ordinal, ordinal),
  );
  const [linked] = await db()
    .update(layoutCandidates)
    .set({ mapFileId: fileId })
    .where(and(where, isNull(layoutCandidates.mapFileId)))
    .returning({ mapFileId: layoutCandidates.mapFileId });
  if (linked?.mapFileId) return linked.mapFileId;
  const [existing] = await db()
    .select({ mapFileId: layoutCandidates.mapFileId })
    .from(layoutCandidates)
    .where(where);
  return existing?.mapFileId ?? fileId;
}
