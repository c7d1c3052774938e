import { hostname } from "node:os";
import {
  answerPartExchange,
  claimPart,
  findOpenPartExchange,
  findPartInputs,
  findPartState,
  recordPartFailure,
  recordPartHeartbeat,
  storePartSchema,
} from "@/db/queries/analysis-parts";
import {
  AnalysisInputError,
  encodingSchema,
  evaluationRequestSchema,
  LocalDigestClient,
  measurementRequestSchema,
  openDatasetPart,
  readClientRows,
} from "@/lib/analysis";
import type { AnalysisPartJob } from "@/lib/jobs";
import { pause } from "@/lib/pause";
import { storedDatasetBytes } from "./stored-dataset-bytes";

/** This process, as the parts it holds name it. */
export const PART_HOLDER = `${hostname()}:${process.pid}`;

export interface PartRunSettings {
  /** The pg-boss job running the part; null when its coordinator took it over in-process. */
  jobId: string | null;
  /** Aborted when the worker stops (or its coordinator's run ends): the part is left to others. */
  signal: AbortSignal;
  heartbeatMs: number;
  staleAfterMs: number;
  /** Between two looks for the coordinator's next question. */
  pollMs?: number;
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

/** Polls between looks at whether the run is still going (about once a second at 20 ms). */
const POLLS_PER_RUN_CHECK = 50;

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
  let client: LocalDigestClient | undefined;
  try {
    const inputs = await findPartInputs(workspaceId, analysisId);
    if (!inputs) return { outcome: "skipped" };
    const { parameters, dataset } = inputs;
    const range = { start: part.startByte, end: part.endByte };
    const raw = await readClientRows({
      data: openDatasetPart(
        storedDatasetBytes(dataset),
        { headerBytes: part.headerBytes, parts: [range] },
        range,
      ),
      dataName: `${dataset.name} (${name})`,
      columns: {
        labelColumn: parameters.labelColumn,
        idColumn: parameters.idColumn,
        shardColumn: parameters.shardColumn,
        features: parameters.features,
      },
    });
    // A shard's rows may fall in several parts: the disclosure minimum of federated clients
    // (methods.md §9) does not apply inside one analysis.
    client = new LocalDigestClient(name, raw, {
      task: parameters.task,
      minimumShardRows: 1,
      threads: settings.threads,
    });
    await storePartSchema(analysisId, runId, partIndex, await client.schema());
    log("read");
    let questions = 0;
    for (let poll = 1; ; poll++) {
      signal.throwIfAborted();
      const open = await findOpenPartExchange(runId, partIndex);
      if (open) {
        await answerPartExchange(open.id, await answer(client, open.kind, open.request));
        questions++;
        if (open.kind !== "evaluate" || questions === 1) log(`answered ${open.kind}`);
        continue;
      }
      if (poll % POLLS_PER_RUN_CHECK === 0 && !(await findPartState(analysisId, runId, partIndex)).live) {
        log(`done after ${questions} questions`);
        return { outcome: "answered", questions };
      }
      await pause(settings.pollMs ?? 20, signal);
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
    clearInterval(heartbeat);
    await client?.close();
  }
}

/** One question of the coordinator (stored-part-connection.ts), answered from the part's rows. */
async function answer(client: LocalDigestClient, kind: string, question: unknown) {
  const { encoding, request } = question as { encoding: unknown; request?: unknown };
  const parsedEncoding = encodingSchema.parse(encoding);
  if (kind === "gram") return client.gram(parsedEncoding);
  if (kind === "evaluate") {
    return client.evaluate(parsedEncoding, evaluationRequestSchema.parse(request));
  }
  return client.gradients(parsedEncoding, measurementRequestSchema.parse(request));
}
