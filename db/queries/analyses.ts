import "server-only";
import { and, desc, eq, inArray, or, sql } from "drizzle-orm";
import { db } from "@/db/client";
import { analyses, dataFiles, reports } from "@/db/schema";
import type { AnalysisProgress, SimulationProgress } from "@/lib/analysis";
import { encodeListCursor, type ListCursor } from "@/lib/api/list-cursor";
import { RuleError } from "@/lib/errors";
import type { StartAnalysisRequest } from "@/lib/validation/start-analysis";

// Every function here takes the workspace id and filters by it, so no caller can reach another
// workspace's analyses or files, whatever id it was handed.

export type Analysis = typeof analyses.$inferSelect;
export type AnalysisStatus = Analysis["status"];
type DataFile = typeof dataFiles.$inferSelect;

/**
 * This workspace's analysis, only while it is running: the condition of every write a worker makes
 * to a run it holds, so a cancelled or finished analysis is never touched again.
 */
function isRunningAnalysis(workspaceId: string, analysisId: string) {
  return and(
    eq(analyses.workspaceId, workspaceId),
    eq(analyses.id, analysisId),
    eq(analyses.status, "running"),
  );
}

/**
 * A running analysis whose worker is gone: no heartbeat (or start, for a run from before
 * heartbeats) within the last `staleAfterMs`.
 */
function isLostRun(staleAfterMs: number) {
  return and(
    eq(analyses.status, "running"),
    sql`coalesce(${analyses.heartbeatAt}, ${analyses.startedAt}) < now() - make_interval(secs => ${staleAfterMs / 1000})`,
  );
}

/** A registered file as an analysis reads it. */
export type AnalysisInputFile = Pick<
  DataFile,
  "id" | "kind" | "name" | "objectKey" | "sizeBytes" | "sha256"
>;

/** What the progress page and its route handler show of one analysis. */
export type AnalysisStatusView = Pick<
  Analysis,
  | "status"
  | "stage"
  | "fraction"
  | "failureMessage"
  | "attempts"
  | "title"
  | "createdAt"
  | "startedAt"
  | "finishedAt"
  | "simulationProgress"
  | "workerLostAt"
  | "storageUnreachableSince"
> & {
  reportId: string | null;
  /** Whether the analysis was asked to simulate the plan (methods.md §7). */
  simulates: boolean;
};

/** What the worker stores while it runs: the engine's stage, and the simulation once it runs. */
export type LiveProgress = AnalysisProgress & { simulation: SimulationProgress | null };

const inputFileColumns = {
  id: dataFiles.id,
  kind: dataFiles.kind,
  name: dataFiles.name,
  objectKey: dataFiles.objectKey,
  sizeBytes: dataFiles.sizeBytes,
  sha256: dataFiles.sha256,
};

/** The registered files among `fileIds` that belong to this workspace. */
export async function findInputFiles(
  workspaceId: string,
  fileIds: string[],
): Promise<AnalysisInputFile[]> {
  if (fileIds.length === 0) return [];
  return db()
    .select(inputFileColumns)
    .from(dataFiles)
    .where(and(eq(dataFiles.workspaceId, workspaceId), inArray(dataFiles.id, fileIds)));
}

/** True when the report exists in this workspace. */
export async function reportExists(workspaceId: string, reportId: string): Promise<boolean> {
  const [row] = await db()
    .select({ id: reports.id })
    .from(reports)
    .where(and(eq(reports.workspaceId, workspaceId), eq(reports.id, reportId)));
  return row !== undefined;
}

/** Records a requested analysis, queued; the caller has checked its files belong to the workspace. */
export async function insertAnalysis(
  workspaceId: string,
  createdBy: string,
  request: StartAnalysisRequest & { title: string },
): Promise<string> {
  const [row] = await db()
    .insert(analyses)
    .values({
      workspaceId,
      createdBy,
      title: request.title,
      datasetFileId: request.datasetFileId,
      layoutFileId: request.layoutFileId ?? null,
      weightsFileId: request.weightsFileId ?? null,
      previousReportId: request.previousReportId ?? null,
      parameters: request.options,
    })
    .returning({ id: analyses.id });
  return row.id;
}

export async function setAnalysisJobId(
  workspaceId: string,
  analysisId: string,
  jobId: string,
): Promise<void> {
  await db()
    .update(analyses)
    .set({ jobId })
    .where(and(eq(analyses.workspaceId, workspaceId), eq(analyses.id, analysisId)));
}

/** Removes an analysis that could not be queued, so no request waits forever for a worker. */
export async function deleteUnqueuedAnalysis(
  workspaceId: string,
  analysisId: string,
): Promise<void> {
  await db()
    .delete(analyses)
    .where(
      and(
        eq(analyses.workspaceId, workspaceId),
        eq(analyses.id, analysisId),
        eq(analyses.status, "queued"),
      ),
    );
}

/**
 * Marks a queued or running analysis cancelled. The worker sees the status at its next progress
 * write (at most a second later) and stops; a job that has not started finds it and does nothing.
 */
export async function cancelQueuedOrRunning(
  workspaceId: string,
  analysisId: string,
): Promise<void> {
  const [cancelled] = await db()
    .update(analyses)
    .set({ status: "cancelled", finishedAt: sql`now()` })
    .where(
      and(
        eq(analyses.workspaceId, workspaceId),
        eq(analyses.id, analysisId),
        inArray(analyses.status, ["queued", "running"]),
      ),
    )
    .returning({ id: analyses.id });
  if (cancelled) return;
  const current = await findAnalysisStatus(workspaceId, analysisId);
  if (!current) throw new RuleError(404, "That analysis does not exist.");
  throw new RuleError(
    409,
    current.status === "cancelled"
      ? "This analysis was already cancelled."
      : `This analysis has already ${current.status}; there is nothing to cancel.`,
  );
}

/** The live state of one analysis, with its report's id once there is one. */
export async function findAnalysisStatus(
  workspaceId: string,
  analysisId: string,
): Promise<AnalysisStatusView | undefined> {
  const [row] = await db()
    .select({
      status: analyses.status,
      stage: analyses.stage,
      fraction: analyses.fraction,
      failureMessage: analyses.failureMessage,
      attempts: analyses.attempts,
      title: analyses.title,
      createdAt: analyses.createdAt,
      startedAt: analyses.startedAt,
      finishedAt: analyses.finishedAt,
      simulationProgress: analyses.simulationProgress,
      workerLostAt: analyses.workerLostAt,
      storageUnreachableSince: analyses.storageUnreachableSince,
      simulates: sql<boolean>`(${analyses.parameters} -> 'simulate') is not null`,
      reportId: reports.id,
    })
    .from(analyses)
    .leftJoin(reports, eq(reports.analysisId, analyses.id))
    .where(and(eq(analyses.workspaceId, workspaceId), eq(analyses.id, analysisId)));
  return row;
}

// ——— The worker's side: one analysis run, keyed by the job's workspace and analysis ids. ———

/** An analysis a worker has taken on, with the files it reads. */
export type ClaimedAnalysis = Analysis & {
  dataset: AnalysisInputFile;
  layout: AnalysisInputFile | null;
  weights: AnalysisInputFile | null;
};

/**
 * Takes an analysis for a run: a queued one, or a running one whose worker died (no heartbeat for
 * `staleAfterMs`). Marks it running with one more attempt. Returns undefined when it is finished,
 * cancelled, gone, or still running on a live worker (its job expired while a long run or a
 * storage outage kept it busy), so a late or duplicated job simply completes.
 */
export async function claimAnalysis(
  workspaceId: string,
  analysisId: string,
  staleAfterMs: number,
): Promise<ClaimedAnalysis | undefined> {
  const [claimed] = await db()
    .update(analyses)
    .set({
      status: "running",
      attempts: sql`${analyses.attempts} + 1`,
      startedAt: sql`now()`,
      stage: null,
      fraction: 0,
      simulationProgress: null,
      failureMessage: null,
      heartbeatAt: sql`now()`,
      storageUnreachableSince: null,
      // What the report says of how the run went is this run's alone, not an earlier attempt's.
      rowsSpilledAtLimit: null,
      readWholeBecause: null,
    })
    .where(
      and(
        eq(analyses.workspaceId, workspaceId),
        eq(analyses.id, analysisId),
        or(eq(analyses.status, "queued"), isLostRun(staleAfterMs)),
      ),
    )
    .returning();
  if (!claimed) return undefined;
  const fileIds = [claimed.datasetFileId, claimed.layoutFileId, claimed.weightsFileId].filter(
    (id): id is string => id !== null,
  );
  const files = new Map(
    (await findInputFiles(workspaceId, fileIds)).map((file) => [file.id, file]),
  );
  const fileOf = (id: string | null) => (id === null ? null : (files.get(id) ?? null));
  const dataset = fileOf(claimed.datasetFileId);
  if (!dataset) throw new Error(`analysis ${analysisId}: its dataset file is missing`);
  return {
    ...claimed,
    dataset,
    layout: fileOf(claimed.layoutFileId),
    weights: fileOf(claimed.weightsFileId),
  };
}

/**
 * Stores the stage and fraction of a running analysis, and the simulation's run and round. Returns false when the analysis is no
 * longer running (cancelled, or finished by another worker), which tells the worker to stop.
 */
export async function recordProgress(
  workspaceId: string,
  analysisId: string,
  progress: LiveProgress,
): Promise<boolean> {
  const updated = await db()
    .update(analyses)
    .set({
      stage: progress.stage,
      fraction: progress.fraction,
      simulationProgress: progress.simulation,
    })
    .where(isRunningAnalysis(workspaceId, analysisId))
    .returning({ id: analyses.id });
  return updated.length > 0;
}

/** The worker's sign of life for a run it holds; false when the analysis is no longer running. */
export async function recordHeartbeat(workspaceId: string, analysisId: string): Promise<boolean> {
  const updated = await db()
    .update(analyses)
    .set({ heartbeatAt: sql`now()` })
    .where(isRunningAnalysis(workspaceId, analysisId))
    .returning({ id: analyses.id });
  return updated.length > 0;
}

/** A run whose worker stopped giving signs of life, handed back to the queue. */
export interface LostRun {
  analysisId: string;
  workspaceId: string;
  jobId: string | null;
}

/**
 * Hands every running analysis whose last heartbeat (or start, for a run from before heartbeats)
 * is older than `staleAfterMs` back to the queue, with the time its worker was found gone and a
 * note for the progress page. Across all workspaces: this is the workers' housekeeping, not a
 * user's request.
 */
export async function handBackLostRuns(staleAfterMs: number, note: string): Promise<LostRun[]> {
  return db()
    .update(analyses)
    .set({
      status: "queued",
      workerLostAt: sql`now()`,
      failureMessage: note,
      heartbeatAt: null,
    })
    .where(isLostRun(staleAfterMs))
    .returning({
      analysisId: analyses.id,
      workspaceId: analyses.workspaceId,
      jobId: analyses.jobId,
    });
}

/** Records that the run's rows went to a scratch file under this memory limit (bytes). */
export async function recordRowsSpilled(
  workspaceId: string,
  analysisId: string,
  limitBytes: number,
): Promise<void> {
  await db()
    .update(analyses)
    .set({ rowsSpilledAtLimit: limitBytes })
    .where(and(eq(analyses.workspaceId, workspaceId), eq(analyses.id, analysisId)));
}

/**
 * Records why an analysis meant to be shared among workers was read whole by one (null: it was
 * shared).
 */
export async function recordReadWhole(
  workspaceId: string,
  analysisId: string,
  because: string | null,
): Promise<void> {
  await db()
    .update(analyses)
    .set({ readWholeBecause: because })
    .where(and(eq(analyses.workspaceId, workspaceId), eq(analyses.id, analysisId)));
}

/**
 * How the analysis's last run went where the report says so: the memory limit under which its rows
 * went to a scratch file, and why it was read whole when it was meant to be shared (null when not).
 */
export async function findRunCircumstances(
  workspaceId: string,
  analysisId: string,
): Promise<{ rowsSpilledAtLimit: number | null; readWholeBecause: string | null }> {
  const [row] = await db()
    .select({
      rowsSpilledAtLimit: analyses.rowsSpilledAtLimit,
      readWholeBecause: analyses.readWholeBecause,
    })
    .from(analyses)
    .where(and(eq(analyses.workspaceId, workspaceId), eq(analyses.id, analysisId)));
  return {
    rowsSpilledAtLimit: row?.rowsSpilledAtLimit ?? null,
    readWholeBecause: row?.readWholeBecause ?? null,
  };
}

/** Marks the run as waiting for storage since now, unless it already was; returns since when. */
export async function recordStorageUnreachable(
  workspaceId: string,
  analysisId: string,
): Promise<Date | undefined> {
  const [row] = await db()
    .update(analyses)
    .set({ storageUnreachableSince: sql`coalesce(${analyses.storageUnreachableSince}, now())` })
    .where(isRunningAnalysis(workspaceId, analysisId))
    .returning({ since: analyses.storageUnreachableSince });
  return row?.since ?? undefined;
}

/** Storage answers again: the run's notice goes. */
export async function clearStorageUnreachable(workspaceId: string, analysisId: string) {
  await db()
    .update(analyses)
    .set({ storageUnreachableSince: null })
    .where(and(eq(analyses.workspaceId, workspaceId), eq(analyses.id, analysisId)));
}

/** True while the analysis is running; polled when no progress arrives for a while. */
export async function isAnalysisRunning(workspaceId: string, analysisId: string): Promise<boolean> {
  const [row] = await db()
    .select({ status: analyses.status })
    .from(analyses)
    .where(and(eq(analyses.workspaceId, workspaceId), eq(analyses.id, analysisId)));
  return row?.status === "running";
}

/**
 * Ends a running analysis as failed (final), or hands it back to the queue when its job will be
 * retried. A cancelled or finished analysis is left as it is.
 */
export async function endRunUnsuccessfully(
  workspaceId: string,
  analysisId: string,
  outcome: { status: "failed" | "queued"; message: string },
): Promise<void> {
  await db()
    .update(analyses)
    .set({
      status: outcome.status,
      failureMessage: outcome.message,
      finishedAt: outcome.status === "failed" ? sql`now()` : null,
    })
    .where(isRunningAnalysis(workspaceId, analysisId));
}

/** What the API's analyses list shows of one analysis. */
export type AnalysisListItem = Pick<
  Analysis,
  "id" | "title" | "status" | "stage" | "createdAt" | "finishedAt"
>;

/**
 * One page of the workspace's analyses, newest first (ties by id), starting after `after`;
 * `nextCursor` is null on the last page.
 */
export async function listAnalysisPage(
  workspaceId: string,
  limit: number,
  after?: ListCursor,
): Promise<{ analyses: AnalysisListItem[]; nextCursor: string | null }> {
  // One more than shown tells whether a next page exists without counting the whole list.
  const rows = await db()
    .select({
      analysis: {
        id: analyses.id,
        title: analyses.title,
        status: analyses.status,
        stage: analyses.stage,
        createdAt: analyses.createdAt,
        finishedAt: analyses.finishedAt,
      },
      createdAtText: sql<string>`${analyses.createdAt}::text`,
    })
    .from(analyses)
    .where(
      and(
        eq(analyses.workspaceId, workspaceId),
        after
          ? sql`(${analyses.createdAt}, ${analyses.id}) < (${after.createdAt}::timestamptz, ${after.id})`
          : undefined,
      ),
    )
    .orderBy(desc(analyses.createdAt), desc(analyses.id))
    .limit(limit + 1);
  const last = rows[limit - 1];
  return {
    analyses: rows.slice(0, limit).map((row) => row.analysis),
    nextCursor:
      rows.length > limit
        ? encodeListCursor({ createdAt: last.createdAtText, id: last.analysis.id })
        : null,
  };
}
