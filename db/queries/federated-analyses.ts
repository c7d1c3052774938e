import "server-only";
import { and, desc, eq, inArray, isNotNull, isNull, lt, or, sql } from "drizzle-orm";
import { db } from "@/db/client";
import { federatedAnalyses, federatedClients, reports } from "@/db/schema";
import { COORDINATED_FEDERATED_STATES, type FederatedState } from "@/db/schema/federated";
import type { DigestEncoding } from "@/lib/analysis";
import { notifyFederatedState } from "./federated-notices";

// Every function that takes a workspace filters by it: a federated analysis of another workspace
// is "not found", never "forbidden".

export type FederatedAnalysisRow = typeof federatedAnalyses.$inferSelect;
export type FederatedClientRow = typeof federatedClients.$inferSelect;

export async function insertFederatedAnalysis(
  values: typeof federatedAnalyses.$inferInsert,
  clientNames: string[],
): Promise<FederatedAnalysisRow> {
  return db().transaction(async (tx) => {
    const [analysis] = await tx.insert(federatedAnalyses).values(values).returning();
    await tx
      .insert(federatedClients)
      .values(clientNames.map((name) => ({ federatedAnalysisId: analysis.id, name })));
    return analysis;
  });
}

export async function findFederatedAnalysis(
  workspaceId: string,
  analysisId: string,
): Promise<FederatedAnalysisRow | undefined> {
  const [row] = await db()
    .select()
    .from(federatedAnalyses)
    .where(
      and(eq(federatedAnalyses.workspaceId, workspaceId), eq(federatedAnalyses.id, analysisId)),
    );
  return row;
}

/** The worker's and the client key's look-up: by id alone (the caller already knows the scope). */
export async function findFederatedAnalysisById(
  analysisId: string,
): Promise<FederatedAnalysisRow | undefined> {
  const [row] = await db()
    .select()
    .from(federatedAnalyses)
    .where(eq(federatedAnalyses.id, analysisId));
  return row;
}

/** The workspace's federated analyses, newest first, without their encodings. */
export async function listFederatedAnalyses(workspaceId: string) {
  return db()
    .select({
      id: federatedAnalyses.id,
      title: federatedAnalyses.title,
      state: federatedAnalyses.state,
      reportId: federatedAnalyses.reportId,
      createdAt: federatedAnalyses.createdAt,
      finishedAt: federatedAnalyses.finishedAt,
      expectedClients: sql<number>`(select count(*)::int from ${federatedClients} where ${federatedClients.federatedAnalysisId} = ${federatedAnalyses.id})`,
    })
    .from(federatedAnalyses)
    .where(eq(federatedAnalyses.workspaceId, workspaceId))
    .orderBy(desc(federatedAnalyses.createdAt));
}

/** The federated analysis that made this report of the workspace ("run again"), or undefined. */
export async function findFederatedAnalysisOfReport(
  workspaceId: string,
  reportId: string,
): Promise<FederatedAnalysisRow | undefined> {
  const [row] = await db()
    .select()
    .from(federatedAnalyses)
    .where(
      and(eq(federatedAnalyses.workspaceId, workspaceId), eq(federatedAnalyses.reportId, reportId)),
    );
  return row;
}

/** The roster (unordered: the service orders it by code point, as every merge does). */
export async function listFederatedClients(analysisId: string): Promise<FederatedClientRow[]> {
  return db()
    .select()
    .from(federatedClients)
    .where(eq(federatedClients.federatedAnalysisId, analysisId));
}

export async function findFederatedClientByName(
  analysisId: string,
  name: string,
): Promise<FederatedClientRow | undefined> {
  const [row] = await db()
    .select()
    .from(federatedClients)
    .where(
      and(eq(federatedClients.federatedAnalysisId, analysisId), eq(federatedClients.name, name)),
    );
  return row;
}

export async function updateFederatedClient(
  clientId: string,
  values: Partial<
    Pick<FederatedClientRow, "shards" | "rows" | "roundReached" | "lastSeenAt" | "lastRefusal">
  >,
): Promise<void> {
  await db().update(federatedClients).set(values).where(eq(federatedClients.id, clientId));
}

/** How fresh the roster's "last seen" is: finer than the key's last use, the fit's pace is seconds. */
const CLIENT_SEEN_RESOLUTION_MS = 5_000;

/**
 * A client was heard from (any request with its key); written only when the recorded time is
 * older than CLIENT_SEEN_RESOLUTION_MS, since a connected client polls several times a second.
 */
export async function markClientSeen(clientId: string, now = new Date()): Promise<void> {
  const recentEnough = new Date(now.getTime() - CLIENT_SEEN_RESOLUTION_MS);
  await db()
    .update(federatedClients)
    .set({ lastSeenAt: now })
    .where(
      and(
        eq(federatedClients.id, clientId),
        or(isNull(federatedClients.lastSeenAt), lt(federatedClients.lastSeenAt, recentEnough)),
      ),
    );
}

/**
 * Moves the analysis from one state to another; false when it was no longer in `from` (another
 * request or the coordinator moved it first), so each transition happens once.
 */
export async function moveFederatedState(
  analysisId: string,
  from: readonly FederatedState[],
  values: Partial<
    Pick<
      FederatedAnalysisRow,
      "state" | "encoding" | "evaluations" | "failureMessage" | "jobId" | "finishedAt"
    >
  >,
): Promise<boolean> {
  const moved = await db()
    .update(federatedAnalyses)
    .set(values)
    .where(and(eq(federatedAnalyses.id, analysisId), inArray(federatedAnalyses.state, [...from])))
    .returning({ id: federatedAnalyses.id });
  if (moved.length === 0) return false;
  await notifyFederatedState(analysisId);
  return true;
}

/**
 * A coordinator's job takes the analysis: its first heartbeat, and the job that now holds it (a
 * retry or a later job), so that a sweep can hand that job back. False once the analysis ended.
 */
export async function claimFederatedCoordinator(
  analysisId: string,
  jobId: string,
): Promise<boolean> {
  const claimed = await db()
    .update(federatedAnalyses)
    .set({ heartbeatAt: sql`now()`, jobId })
    .where(
      and(
        eq(federatedAnalyses.id, analysisId),
        inArray(federatedAnalyses.state, [...COORDINATED_FEDERATED_STATES]),
      ),
    )
    .returning({ id: federatedAnalyses.id });
  return claimed.length === 1;
}

/** The coordinator still works on the analysis (only while it holds it). */
export async function recordCoordinatorHeartbeat(analysisId: string): Promise<void> {
  await db()
    .update(federatedAnalyses)
    .set({ heartbeatAt: sql`now()` })
    .where(and(eq(federatedAnalyses.id, analysisId), isNotNull(federatedAnalyses.heartbeatAt)));
}

/** The coordinator let go of the analysis (done, failed, waiting for files, or handed back). */
export async function releaseFederatedCoordinator(analysisId: string): Promise<void> {
  await db()
    .update(federatedAnalyses)
    .set({ heartbeatAt: null })
    .where(eq(federatedAnalyses.id, analysisId));
}

/**
 * Every analysis still being coordinated whose coordinator's last heartbeat is older than
 * `staleAfterMs` (its worker died), released at once so only one sweep hands back its job. Across
 * all workspaces: the workers' housekeeping, not a user's request.
 */
export async function handBackLostCoordinators(
  staleAfterMs: number,
): Promise<{ federatedAnalysisId: string; jobId: string | null }[]> {
  return db()
    .update(federatedAnalyses)
    .set({ heartbeatAt: null })
    .where(
      and(
        inArray(federatedAnalyses.state, [...COORDINATED_FEDERATED_STATES]),
        sql`${federatedAnalyses.heartbeatAt} < now() - make_interval(secs => ${staleAfterMs / 1000})`,
      ),
    )
    .returning({ federatedAnalysisId: federatedAnalyses.id, jobId: federatedAnalyses.jobId });
}

/** Closes the roster of an analysis still collecting schemas; false if it had moved on. */
export async function closeFederatedRoster(
  workspaceId: string,
  analysisId: string,
  now = new Date(),
): Promise<boolean> {
  const closed = await db()
    .update(federatedAnalyses)
    .set({ rosterClosedAt: now })
    .where(
      and(
        eq(federatedAnalyses.workspaceId, workspaceId),
        eq(federatedAnalyses.id, analysisId),
        eq(federatedAnalyses.state, "collecting-schemas"),
      ),
    )
    .returning({ id: federatedAnalyses.id });
  return closed.length === 1;
}

/** Stores the merged round 1 once, while the analysis still collects schemas. */
export async function storeFederatedEncoding(
  analysisId: string,
  encoding: DigestEncoding,
): Promise<boolean> {
  return moveFederatedState(analysisId, ["collecting-schemas"], {
    state: "encoding-ready",
    encoding,
  });
}

/** Whether a report of this workspace exists (a revision's predecessor). */
export async function workspaceReportExists(
  workspaceId: string,
  reportId: string,
): Promise<boolean> {
  const [row] = await db()
    .select({ id: reports.id })
    .from(reports)
    .where(and(eq(reports.workspaceId, workspaceId), eq(reports.id, reportId)));
  return row !== undefined;
}
