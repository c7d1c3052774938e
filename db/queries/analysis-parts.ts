import "server-only";
import { and, asc, eq, isNull, or, sql } from "drizzle-orm";
import { db } from "@/db/client";
import { listen } from "@/db/notifications";
import { analyses, analysisPartExchanges, analysisParts, dataFiles } from "@/db/schema";

// The parts of an analysis shared by several workers (lib/reports/analysis-in-parts.ts). Parts are
// reached by analysis, run and index; the analysis's workspace was checked when its job was claimed.
// Every write another process waits for is followed by a notification (see listenToPart).

export type AnalysisPartRow = typeof analysisParts.$inferSelect;
export type PartExchangeRow = typeof analysisPartExchanges.$inferSelect;
export type PartExchangeKind = PartExchangeRow["kind"];

/**
 * What a notification about a part says: a question was stored for it, it answered one, or its
 * run changed (a part failed, the run ended or was replaced), so its waiters look at the rows again.
 */
export type PartNotice = "question" | "answer" | "state";

const PART_CHANNEL = "analysis_parts";
/** The part index of a notice about every part of an analysis. */
const EVERY_PART = "all";

function partNoticePayload(notice: PartNotice, analysisId: string, partIndex: number | null) {
  return `${notice}:${analysisId}:${partIndex ?? EVERY_PART}`;
}

async function notifyPart(notice: PartNotice, analysisId: string, partIndex: number | null) {
  await db().execute(
    sql`select pg_notify(${PART_CHANNEL}, ${partNoticePayload(notice, analysisId, partIndex)})`,
  );
}

/**
 * Calls `onNotice` on each of `notices` about the analysis's part `partIndex` (or about all its
 * parts) from any process, until the returned function is called. Notices are hints: a waiter
 * reads the rows, and looks again after a timeout in case one was lost.
 */
export async function listenToPart(
  analysisId: string,
  partIndex: number,
  notices: PartNotice[],
  onNotice: () => void,
): Promise<() => void> {
  const payloads = new Set(
    notices.flatMap((notice) => [
      partNoticePayload(notice, analysisId, partIndex),
      partNoticePayload(notice, analysisId, null),
    ]),
  );
  return listen(PART_CHANNEL, (payload) => {
    if (payloads.has(payload)) onNotice();
  });
}

/** One part's place in the dataset, as the coordinator planned it. */
export interface PlannedPart {
  headerBytes: number;
  startByte: number;
  endByte: number;
}

/**
 * Starts a run of an analysis in parts: the parts of any earlier run (a coordinator that stopped)
 * and their questions are removed, so their jobs find nothing and end, and the new parts stored.
 */
export async function startPartRun(
  analysisId: string,
  runId: string,
  parts: PlannedPart[],
): Promise<void> {
  await db().transaction(async (tx) => {
    await tx.delete(analysisPartExchanges).where(eq(analysisPartExchanges.analysisId, analysisId));
    await tx.delete(analysisParts).where(eq(analysisParts.analysisId, analysisId));
    await tx.insert(analysisParts).values(
      parts.map((part, partIndex) => ({
        analysisId,
        runId,
        partIndex,
        partCount: parts.length,
        ...part,
      })),
    );
  });
  await notifyPart("state", analysisId, null);
}

/** Records the pg-boss job sent for a part. */
export async function recordPartJob(
  analysisId: string,
  runId: string,
  partIndex: number,
  jobId: string,
): Promise<void> {
  await db()
    .update(analysisParts)
    .set({ jobId })
    .where(partKey(analysisId, runId, partIndex));
}

/**
 * Takes a part for a run of its job, or for its coordinator taking it over: only while its analysis
 * runs, the part belongs to the current run, and no live worker holds it (a heartbeat within
 * `staleAfterMs`). Counts the attempt and starts its heartbeat; undefined when there is nothing to do.
 */
export async function claimPart(
  part: { analysisId: string; runId: string; partIndex: number },
  holder: { heldBy: string; jobId: string | null; staleAfterMs: number },
): Promise<AnalysisPartRow | undefined> {
  const [row] = await db()
    .update(analysisParts)
    .set({
      attempts: sql`${analysisParts.attempts} + 1`,
      heartbeatAt: sql`now()`,
      heldBy: holder.heldBy,
      ...(holder.jobId === null ? {} : { jobId: holder.jobId }),
    })
    .where(
      and(
        partKey(part.analysisId, part.runId, part.partIndex),
        or(
          isNull(analysisParts.heartbeatAt),
          sql`${analysisParts.heartbeatAt} < now() - make_interval(secs => ${holder.staleAfterMs / 1000})`,
        ),
        sql`exists (select 1 from ${analyses} where ${analyses.id} = ${part.analysisId} and ${analyses.status} = 'running')`,
      ),
    )
    .returning();
  return row;
}

/** The dataset and options a part is read with. */
export async function findPartInputs(workspaceId: string, analysisId: string) {
  const [row] = await db()
    .select({
      parameters: analyses.parameters,
      dataset: {
        kind: dataFiles.kind,
        name: dataFiles.name,
        objectKey: dataFiles.objectKey,
        sizeBytes: dataFiles.sizeBytes,
      },
    })
    .from(analyses)
    .innerJoin(dataFiles, eq(dataFiles.id, analyses.datasetFileId))
    .where(and(eq(analyses.workspaceId, workspaceId), eq(analyses.id, analysisId)));
  return row;
}

/** Records why a part cannot be read; its coordinator ends the analysis with the message. */
export async function recordPartFailure(
  analysisId: string,
  runId: string,
  partIndex: number,
  message: string,
): Promise<void> {
  await db()
    .update(analysisParts)
    .set({ failureMessage: message })
    .where(partKey(analysisId, runId, partIndex));
  await notifyPart("state", analysisId, partIndex);
}

/** Records that the part's rows went to a scratch file past its worker's memory limit. */
export async function recordPartSpill(
  analysisId: string,
  runId: string,
  partIndex: number,
  limitBytes: number,
): Promise<void> {
  await db()
    .update(analysisParts)
    .set({ rowsSpilledAtLimit: limitBytes })
    .where(partKey(analysisId, runId, partIndex));
}

/**
 * Where a part's run stands: live while its analysis runs and the run is current, and the part's
 * failure message once its worker gave up on it.
 */
export async function findPartState(
  analysisId: string,
  runId: string,
  partIndex: number,
): Promise<{ live: boolean; failureMessage: string | null }> {
  const [row] = await db()
    .select({ status: analyses.status, failureMessage: analysisParts.failureMessage })
    .from(analyses)
    .innerJoin(analysisParts, eq(analysisParts.analysisId, analyses.id))
    .where(and(eq(analyses.id, analysisId), partKey(analysisId, runId, partIndex)));
  return { live: row?.status === "running", failureMessage: row?.failureMessage ?? null };
}

/** The holder's heartbeat; false when the part was handed to another worker meanwhile. */
export async function recordPartHeartbeat(
  analysisId: string,
  runId: string,
  partIndex: number,
  heldBy: string,
): Promise<boolean> {
  const rows = await db()
    .update(analysisParts)
    .set({ heartbeatAt: sql`now()` })
    .where(and(partKey(analysisId, runId, partIndex), eq(analysisParts.heldBy, heldBy)))
    .returning({ partIndex: analysisParts.partIndex });
  return rows.length === 1;
}

/**
 * Hands a part back at once (its worker is stopping): no longer held, so the next worker to run
 * its job — or its coordinator — takes it without waiting for the heartbeat to go stale.
 */
export async function releasePart(
  analysisId: string,
  runId: string,
  partIndex: number,
  heldBy: string,
): Promise<void> {
  await db()
    .update(analysisParts)
    .set({ heartbeatAt: null, heldBy: null })
    .where(and(partKey(analysisId, runId, partIndex), eq(analysisParts.heldBy, heldBy)));
}

/** Stores a part's round-1 digest once (a part redone computes the same one): its first answer. */
export async function storePartSchema(
  analysisId: string,
  runId: string,
  partIndex: number,
  digest: unknown,
): Promise<void> {
  await db()
    .update(analysisParts)
    .set({ schemaDigest: digest })
    .where(and(partKey(analysisId, runId, partIndex), isNull(analysisParts.schemaDigest)));
  await notifyPart("answer", analysisId, partIndex);
}

/** The parts of a run, in file order. */
export async function listRunParts(analysisId: string, runId: string): Promise<AnalysisPartRow[]> {
  return db()
    .select()
    .from(analysisParts)
    .where(and(eq(analysisParts.analysisId, analysisId), eq(analysisParts.runId, runId)))
    .orderBy(asc(analysisParts.partIndex));
}

/** Stores a question to a part once (keyed by the request's hash) and returns it as stored. */
export async function openPartExchange(values: {
  analysisId: string;
  runId: string;
  partIndex: number;
  kind: PartExchangeKind;
  requestKey: string;
  request: unknown;
}): Promise<PartExchangeRow> {
  const inserted = await db()
    .insert(analysisPartExchanges)
    .values(values)
    .onConflictDoNothing()
    .returning({ id: analysisPartExchanges.id });
  if (inserted.length > 0) await notifyPart("question", values.analysisId, values.partIndex);
  const [row] = await db()
    .select()
    .from(analysisPartExchanges)
    .where(
      and(
        eq(analysisPartExchanges.runId, values.runId),
        eq(analysisPartExchanges.partIndex, values.partIndex),
        eq(analysisPartExchanges.kind, values.kind),
        eq(analysisPartExchanges.requestKey, values.requestKey),
      ),
    );
  return row;
}

/** The answer to a question, once there is one. */
export async function findPartAnswer(exchangeId: string): Promise<unknown> {
  const [row] = await db()
    .select({ answer: analysisPartExchanges.answer })
    .from(analysisPartExchanges)
    .where(eq(analysisPartExchanges.id, exchangeId));
  return row?.answer ?? null;
}

/** The part's oldest unanswered question, if any. */
export async function findOpenPartExchange(
  runId: string,
  partIndex: number,
): Promise<PartExchangeRow | undefined> {
  const [row] = await db()
    .select()
    .from(analysisPartExchanges)
    .where(
      and(
        eq(analysisPartExchanges.runId, runId),
        eq(analysisPartExchanges.partIndex, partIndex),
        isNull(analysisPartExchanges.answeredAt),
      ),
    )
    .orderBy(asc(analysisPartExchanges.createdAt))
    .limit(1);
  return row;
}

/** Records an answer once (a part redone on two workers at once answers the same). */
export async function answerPartExchange(exchangeId: string, answer: unknown): Promise<void> {
  const [answered] = await db()
    .update(analysisPartExchanges)
    .set({ answer, answeredAt: sql`now()` })
    .where(and(eq(analysisPartExchanges.id, exchangeId), isNull(analysisPartExchanges.answeredAt)))
    .returning({
      analysisId: analysisPartExchanges.analysisId,
      partIndex: analysisPartExchanges.partIndex,
    });
  if (answered) await notifyPart("answer", answered.analysisId, answered.partIndex);
}

/** Abandons a run (the analysis goes on in one process): its parts' jobs find nothing and end. */
export async function removePartRun(analysisId: string): Promise<void> {
  await db().transaction(async (tx) => {
    await tx.delete(analysisPartExchanges).where(eq(analysisPartExchanges.analysisId, analysisId));
    await tx.delete(analysisParts).where(eq(analysisParts.analysisId, analysisId));
  });
  await notifyPart("state", analysisId, null);
}

/**
 * The questions of an ended run are of no further use; its parts stay, for the report's notes.
 * Their workers are told, so they stop at once.
 */
export async function removePartExchanges(analysisId: string): Promise<void> {
  await db().delete(analysisPartExchanges).where(eq(analysisPartExchanges.analysisId, analysisId));
  await notifyPart("state", analysisId, null);
}

export interface LostPart {
  analysisId: string;
  workspaceId: string;
  runId: string;
  partIndex: number;
  partCount: number;
  jobId: string | null;
}

/**
 * Parts of running analyses whose worker stopped sending heartbeats for `staleAfterMs`: each is
 * counted as lost once (its heartbeat cleared until a worker takes it again) and returned, for its
 * job to be handed to another worker.
 */
export async function handBackLostParts(staleAfterMs: number): Promise<LostPart[]> {
  const rows = await db()
    .update(analysisParts)
    .set({
      heartbeatAt: null,
      heldBy: null,
      workerLosses: sql`${analysisParts.workerLosses} + 1`,
    })
    .from(analyses)
    .where(
      and(
        eq(analyses.id, analysisParts.analysisId),
        eq(analyses.status, "running"),
        sql`${analysisParts.heartbeatAt} < now() - make_interval(secs => ${staleAfterMs / 1000})`,
      ),
    )
    .returning({
      analysisId: analysisParts.analysisId,
      workspaceId: analyses.workspaceId,
      runId: analysisParts.runId,
      partIndex: analysisParts.partIndex,
      partCount: analysisParts.partCount,
      jobId: analysisParts.jobId,
    });
  return rows;
}

/** The parts of the analysis's last run in parts, in file order; empty when it ran in one process. */
export async function listAnalysisParts(
  analysisId: string,
): Promise<
  Pick<
    AnalysisPartRow,
    "partIndex" | "partCount" | "attempts" | "workerLosses" | "rowsSpilledAtLimit"
  >[]
> {
  return db()
    .select({
      partIndex: analysisParts.partIndex,
      partCount: analysisParts.partCount,
      attempts: analysisParts.attempts,
      workerLosses: analysisParts.workerLosses,
      rowsSpilledAtLimit: analysisParts.rowsSpilledAtLimit,
    })
    .from(analysisParts)
    .where(eq(analysisParts.analysisId, analysisId))
    .orderBy(asc(analysisParts.partIndex));
}

function partKey(analysisId: string, runId: string, partIndex: number) {
  return and(
    eq(analysisParts.analysisId, analysisId),
    eq(analysisParts.runId, runId),
    eq(analysisParts.partIndex, partIndex),
  );
}
