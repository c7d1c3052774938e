import { hostname } from "node:os";
import {
  answerPartExchange,
  claimPart,
  findOpenPartExchange,
  findPartInputs,
  findPartState,
  listenToPart,
  recordPartFailure,
  recordPartHeartbeat,
  recordPartSpill,
  releasePart,
  storePartSchema,
} from "@/db/queries/analysis-parts";
import { AnalysisInputError, resolveMemorySettings } from "@/lib/analysis";
import { Doorbell } from "@/lib/doorbell";
import { env } from "@/lib/env";
import { formatBytes } from "@/lib/uploads/file-rules";
import type { AnalysisPartJob } from "@/lib/jobs";
import { PartRowsThread } from "./part-rows-thread";

/** This process, as the parts it holds name it. */
export const PART_HOLDER = `${hostname()}:${process.pid}`;

export interface PartRunSettings {
  /** The pg-boss job running the part; null when its coordinator took it over in-process. */
  jobId: string | null;
  /** Aborted when the worker stops (or its coordinator's run ends): the part is left to others. */
  signal: AbortSignal;
  /**
   * Whether an abort of `signal` means this worker is stopping while the run goes on, so the part
   * is handed back at once for another worker (its job is retried) instead of after its heartbeat
   * goes stale.
   */
  handBackOnAbort: boolean;
  heartbeatMs: number;
  staleAfterMs: number;
  /** Threads of the part's passes (default: the cores this process may use). */
  threads?: number;
  /** Whether the part's job runs again if this run throws; on the last try a failure is recorded. */
  willRetry: boolean;
  log?: (line: string) => void;
}

export type PartOutcome =
  | { outcome: "answered"; questions: number }
  /** Nothing to do: the run ended, was replaced, or a live worker holds the part. */
  | { outcome: "skipped" }
  | { outcome: "failed"; message: string };

/**
 * Longest wait for a question without a notification before looking again, and between looks at
 * whether the run is still going when nobody said it ended (a cancelled analysis, a lost notice).
 */
const LOOK_AGAIN_MS = 1000;

/**
 * One part of an analysis shared by several workers, as a client of methods.md §9: reads its byte
 * range of the stored dataset (the header first), stores its round-1 digest, then answers the
 * coordinator's questions — evaluations of the fit, round 2 — from its encoded rows, which it
 * keeps between the fit's rounds, until the run ends. A part redone after its worker stopped
 * computes the same digest (kept from the first) and answers what is still open.
 */
export async function runAnalysisPart(
  job: AnalysisPartJob,
  settings: PartRunSettings,
): Promise<PartOutcome> {
  const { analysisId, workspaceId, runId, partIndex } = job;
  const part = await claimPart(job, {
    heldBy: PART_HOLDER,
    jobId: settings.jobId,
    staleAfterMs: settings.staleAfterMs,
  });
  if (!part) return { outcome: "skipped" };
  const name = `part ${partIndex + 1} of ${part.partCount}`;
  const log = (line: string) => settings.log?.(`analysis ${analysisId}, ${name}: ${line}`);
  log(part.attempts > 1 ? `taken over (attempt ${part.attempts})` : "started");

  // Listening before the round-1 digest is stored, so the coordinator's first question wakes it.
  const questions = new Doorbell();
  const stopListening = await listenToPart(analysisId, partIndex, ["question", "state"], () =>
    questions.ring(),
  );
  const handedOver = new AbortController();
  const signal = AbortSignal.any([settings.signal, handedOver.signal]);
  const heartbeat = setInterval(() => {
    recordPartHeartbeat(analysisId, runId, partIndex, PART_HOLDER).then(
      (held) => {
        if (!held) handedOver.abort();
      },
      (error: unknown) =>
        log(`could not record a heartbeat: ${error instanceof Error ? error.message : error}`),
    );
  }, settings.heartbeatMs);
  let rows: PartRowsThread | undefined;
  /** The memory limit once the part's rows went to a scratch file past it. */
  let spilled: number | undefined;
  let spillRecorded = false;
  try {
    const inputs = await findPartInputs(workspaceId, analysisId);
    if (!inputs) return { outcome: "skipped" };
    const { parameters, dataset } = inputs;
    // The memory limit applies to the part's worker as to a one-process analysis: rows beyond
    // its share go to a scratch file (the report page says so).
    const { PARTITA_MEMORY_LIMIT, PARTITA_SCRATCH_DIR } = env();
    const memory = resolveMemorySettings({
      limitBytes: PARTITA_MEMORY_LIMIT,
      scratchDirectory: PARTITA_SCRATCH_DIR,
    });
    const recordSpill = async () => {
      if (spilled === undefined || spillRecorded) return;
      spillRecorded = true;
      await recordPartSpill(analysisId, runId, partIndex, spilled);
      log(`rows kept in a scratch file past the memory limit (${formatBytes(spilled)})`);
    };
    rows = new PartRowsThread(
      {
        name,
        dataset,
        range: { headerBytes: part.headerBytes, start: part.startByte, end: part.endByte },
        columns: {
          labelColumn: parameters.labelColumn,
          idColumn: parameters.idColumn,
          shardColumn: parameters.shardColumn,
          features: parameters.features,
        },
        task: parameters.task,
        threads: settings.threads,
        memory: { limitBytes: memory.limitBytes, scratchDirectory: memory.scratchDirectory },
      },
      // A worker that stops mid-read hands its part back at once, not after the whole range.
      { signal, onSpill: () => (spilled ??= memory.limitBytes) },
    );
    await storePartSchema(analysisId, runId, partIndex, await rows.schema);
    await recordSpill();
    log("read");
    let answered = 0;
    // The run's state is read only after a wait: a ring without a question is its end (or a
    // timeout), while a part that has just answered waits for the next question at once.
    let waited = false;
    for (;;) {
      signal.throwIfAborted();
      const open = await findOpenPartExchange(runId, partIndex);
      if (open) {
        await answerPartExchange(open.id, await rows.ask(open.kind, open.request));
        // The rows are encoded at the first question: that is where they may outgrow the limit.
        await recordSpill();
        answered++;
        if (open.kind !== "evaluate" || answered === 1) log(`answered ${open.kind}`);
        waited = false;
        continue;
      }
      if (waited && !(await findPartState(analysisId, runId, partIndex)).live) {
        log(`done after ${answered} questions`);
        return { outcome: "answered", questions: answered };
      }
      await questions.wait(LOOK_AGAIN_MS, signal);
      waited = true;
    }
  } catch (error) {
    if (error instanceof AnalysisInputError) {
      await recordPartFailure(analysisId, runId, partIndex, error.message);
      return { outcome: "failed", message: error.message };
    }
    if (handedOver.signal.aborted) {
      log("handed to another worker");
      return { outcome: "skipped" };
    }
    if (settings.signal.aborted && settings.handBackOnAbort) {
      await releasePart(analysisId, runId, partIndex, PART_HOLDER);
      log("handed back: this worker is stopping");
    }
    if (!settings.willRetry && !settings.signal.aborted) {
      await recordPartFailure(
        analysisId,
        runId,
        partIndex,
        "A part of the analysis failed on our side, not because of your files; run it again.",
      );
    }
    throw error;
  } finally {
    stopListening();
    clearInterval(heartbeat);
    await rows?.close();
  }
}
