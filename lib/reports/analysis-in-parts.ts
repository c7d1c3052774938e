import { createHash, randomUUID } from "node:crypto";
import {
  listenToPart,
  listRunParts,
  recordPartJob,
  removePartExchanges,
  removePartRun,
  startPartRun,
} from "@/db/queries/analysis-parts";
import { recordReadWhole, type ClaimedAnalysis } from "@/db/queries/analyses";
import {
  analyzeFromDigests,
  findColumnsNeedingAllRows,
  mergeSchemaDigests,
  PartsConnection,
  planDatasetParts,
  type AnalysisProgress,
  type DatasetPartPlan,
  type AnalysisStage,
} from "@/lib/analysis";
import { Doorbell } from "@/lib/doorbell";
import type { AnalysisPartJob } from "@/lib/jobs";
import { getObjectStream, isStorageUnreachable } from "@/lib/storage";
import { PLAN_DEFAULTS } from "@/lib/validation/analysis-options";
import { StorageUnreachableError, type EngineOutcome } from "./engine-thread";
import { runAnalysisPart } from "./run-analysis-part";
import { storedDatasetBytes } from "./stored-dataset-bytes";
import { PartFailedError, StoredPartConnection } from "./stored-part-connection";

export interface PartsSettings {
  /** Parts a large analysis is split into; 1 keeps every analysis in one process. */
  parts: number;
  /** Smallest dataset, in bytes, worth splitting. */
  minBytes: number;
  /** Sends a part's job to the queue; its id, or null when the part already has a queued job. */
  sendPart(job: AnalysisPartJob): Promise<string | null>;
  heartbeatMs: number;
  staleAfterMs: number;
  /**
   * How long a part may wait for a worker before the coordinator's own process runs it: a part
   * nobody took (more parts than free workers) or one whose worker stopped while the others are
   * busy with theirs. 10 s by default, a few of the workers' 1 s polls.
   */
  takeOverAfterMs?: number;
  log?: (line: string) => void;
}

/**
 * How many parts the analysis is shared among; 1 when it runs in one process. Split only what
 * the parts give exactly as one process does (methods.md §9's equality): a dataset of at least
 * `minBytes` whose rows carry their shard (a shard column), no partition map (it is keyed by rows
 * a part cannot see), no uploaded weights, no simulation (it needs every row in one place), no
 * regression (label skew would come from a histogram), and the text rules at their defaults.
 */
export function partCountFor(analysis: ClaimedAnalysis, settings: PartsSettings): number {
  const options = analysis.parameters;
  const splittable =
    settings.parts > 1 &&
    analysis.dataset.sizeBytes >= settings.minBytes &&
    analysis.layout === null &&
    analysis.weights === null &&
    options.shardColumn !== undefined &&
    options.simulate === undefined &&
    options.task !== "regression" &&
    (options.encoding ?? "utf-8") === "utf-8" &&
    options.delimiter === undefined &&
    options.decimalMark === undefined &&
    !options.badNumbersAsMissing &&
    !options.dropUnassignedRows;
  return splittable ? settings.parts : 1;
}

const STAGE_OF_ROUND: Record<"schema" | "fit" | "gradients" | "merge", AnalysisStage> = {
  schema: "reading",
  fit: "fitting",
  gradients: "measuring",
  merge: "advising",
};

/**
 * The coordinating side of one analysis shared by several workers: cuts the stored dataset into
 * `count` parts (a CSV at line ends, a Parquet file by row groups), sends each part's job (any worker takes it, lib/reports/run-analysis-part.ts),
 * and runs the federated coordinator's own analyzeFromDigests over the parts seen as one client
 * (PartsConnection), so the summary is the one-process summary (methods.md §9's equality).
 * Resolves null when the file cannot be cut (gzip, quoted fields, say) or the label turns out
 * numeric: the caller then runs the analysis in one process, and the report says why.
 */
export async function runAnalysisInParts(
  analysis: ClaimedAnalysis,
  count: number,
  settings: PartsSettings,
  hooks: { signal: AbortSignal; onProgress(progress: AnalysisProgress): void },
): Promise<EngineOutcome | null> {
  try {
    return await coordinateParts(analysis, count, settings, hooks);
  } catch (error) {
    if (isStorageUnreachable(error)) {
      throw new StorageUnreachableError(error instanceof Error ? error.message : String(error));
    }
    throw error;
  }
}

async function coordinateParts(
  analysis: ClaimedAnalysis,
  count: number,
  settings: PartsSettings,
  hooks: { signal: AbortSignal; onProgress(progress: AnalysisProgress): void },
): Promise<EngineOutcome | null> {
  const { dataset } = analysis;
  const plan = await planDatasetParts(storedDatasetBytes(dataset), dataset.name, count);
  // The report says why a file meant to be shared was read whole (a gzip file, say).
  await recordReadWhole(analysis.workspaceId, analysis.id, plan.wholeBecause ?? null);
  if (plan.parts.length < 2) return null;
  const runId = randomUUID();
  // Listening before the first question: every answer wakes the coordinator at once.
  const answers = plan.parts.map(() => new Doorbell());
  const stopListening = await Promise.all(
    answers.map((bell, partIndex) =>
      listenToPart(analysis.id, partIndex, ["answer", "state"], () => bell.ring()),
    ),
  );
  try {
    return await runParts(analysis, plan, runId, answers, settings, hooks);
  } finally {
    for (const stop of stopListening) stop();
  }
}

/** Looks for a part's answer again after this long without a notification. */
const LOOK_AGAIN_MS = 1000;

async function runParts(
  analysis: ClaimedAnalysis,
  plan: DatasetPartPlan,
  runId: string,
  answers: Doorbell[],
  settings: PartsSettings,
  hooks: { signal: AbortSignal; onProgress(progress: AnalysisProgress): void },
): Promise<EngineOutcome | null> {
  const { dataset } = analysis;
  await startPartRun(
    analysis.id,
    runId,
    plan.parts.map((part) => ({
      headerBytes: plan.headerBytes,
      startByte: part.start,
      endByte: part.end,
    })),
  );
  const jobOf = (partIndex: number): AnalysisPartJob => ({
    analysisId: analysis.id,
    workspaceId: analysis.workspaceId,
    runId,
    partIndex,
  });
  for (let partIndex = 0; partIndex < plan.parts.length; partIndex++) {
    const jobId = await settings.sendPart(jobOf(partIndex));
    if (jobId) await recordPartJob(analysis.id, runId, partIndex, jobId);
  }
  settings.log?.(`analysis ${analysis.id}: shared among ${plan.parts.length} parts`);
  const sha256 = dataset.sha256 ? Promise.resolve(dataset.sha256) : hashObject(dataset.objectKey);
  // Awaited once the summary is ready; a failure before then is the run's failure, not a crash.
  sha256.catch(() => undefined);
  const takeOver = takeOverWaitingParts(analysis.id, runId, jobOf, settings, hooks.signal);
  const clock = createStageClock();
  const connections = plan.parts.map(
    (_, partIndex) =>
      new StoredPartConnection({
        analysisId: analysis.id,
        runId,
        partIndex,
        partCount: plan.parts.length,
        signal: hooks.signal,
        answers: answers[partIndex],
        lookAgainMs: LOOK_AGAIN_MS,
      }),
  );
  const whole = new PartsConnection(dataset.name, connections, analysis.parameters.task);
  try {
    clock.enter("reading");
    hooks.onProgress({ stage: "reading", fraction: 0 });
    const schema = await whole.schema();
    // Methods.md §1's rule for numeric columns with bad values needs every row of the column.
    const needAllRows = findColumnsNeedingAllRows(schema);
    if (needAllRows.length > 0) {
      await removePartRun(analysis.id);
      await recordReadWhole(
        analysis.workspaceId,
        analysis.id,
        `${needAllRows.length === 1 ? "column" : "columns"} ${needAllRows.map((name) => `"${name}"`).join(", ")} ${needAllRows.length === 1 ? "mixes" : "mix"} numbers with other values, which only a read of all the rows can judge`,
      );
      return null;
    }
    const encoding = mergeSchemaDigests([schema], {
      task: analysis.parameters.task,
      minimumShardRows: 1,
    });
    if (encoding.task === "regression") {
      await removePartRun(analysis.id);
      await recordReadWhole(
        analysis.workspaceId,
        analysis.id,
        "the label is numeric, and a regression's label skew needs all its rows in one place",
      );
      return null;
    }
    const { localSteps, rounds, batchSize, participants } = analysis.parameters;
    const summary = await analyzeFromDigests([whole], {
      task: analysis.parameters.task,
      lambda: analysis.parameters.lambda ?? PLAN_DEFAULTS.lambda,
      reference: analysis.parameters.reference ?? "optimum",
      plan: {
        participants,
        localSteps: localSteps ?? PLAN_DEFAULTS.localSteps,
        rounds: rounds ?? PLAN_DEFAULTS.rounds,
        batchSize: batchSize ?? PLAN_DEFAULTS.batchSize,
      },
      minimumShardRows: 1,
      onRound: (round, evaluations) => {
        clock.enter(STAGE_OF_ROUND[round]);
        // The fit's evaluations are not known in advance: a fraction that approaches 1.
        const fraction = evaluations === undefined ? 0 : evaluations / (evaluations + 20);
        hooks.onProgress({ stage: STAGE_OF_ROUND[round], fraction });
      },
    });
    // The parts are one dataset read by this analysis, not clients' digests: the summary states
    // what a one-process read states.
    delete summary.digests;
    return {
      type: "finished",
      summary,
      inputs: [
        {
          kind: dataset.kind,
          name: dataset.name,
          objectKey: dataset.objectKey,
          sizeBytes: dataset.sizeBytes,
          sha256: await sha256,
        },
      ],
      stageSeconds: clock.finish(),
      // A part whose rows went past its worker's memory limit is noted part by part (run-notes.ts).
      spilledAtLimit: null,
    };
  } catch (error) {
    if (error instanceof PartFailedError) return { type: "input-error", message: error.message };
    throw error;
  } finally {
    await takeOver.stop();
    await removePartExchanges(analysis.id);
  }
}

/**
 * Runs in this process every part that waited `takeOverAfterMs` without a worker — none took its
 * job, or its worker stopped (lib/reports/lost-runs.ts cleared its heartbeat) while the others
 * hold parts of their own. Claiming is atomic, so a worker taking the part at the same moment
 * leaves one of the two with nothing to do.
 */
function takeOverWaitingParts(
  analysisId: string,
  runId: string,
  jobOf: (partIndex: number) => AnalysisPartJob,
  settings: PartsSettings,
  signal: AbortSignal,
) {
  const stopped = new AbortController();
  const partSignal = AbortSignal.any([signal, stopped.signal]);
  const running = new Map<number, Promise<unknown>>();
  const waitMs = settings.takeOverAfterMs ?? 10_000;
  const look = async () => {
    for (const part of await listRunParts(analysisId, runId)) {
      const waiting = part.heartbeatAt === null && Date.now() - part.createdAt.getTime() >= waitMs;
      if (!waiting || running.has(part.partIndex) || part.failureMessage !== null) continue;
      const run = runAnalysisPart(jobOf(part.partIndex), {
        jobId: null,
        signal: partSignal,
        // Aborted when the coordinator's run ends (or its worker stops, ending the run too).
        handBackOnAbort: false,
        heartbeatMs: settings.heartbeatMs,
        staleAfterMs: settings.staleAfterMs,
        willRetry: true,
        log: settings.log,
      })
        .catch((error: unknown) => {
          if (!partSignal.aborted) {
            settings.log?.(
              `analysis ${analysisId}: part ${part.partIndex + 1} failed here: ${error instanceof Error ? error.message : error}`,
            );
          }
        })
        .finally(() => running.delete(part.partIndex));
      running.set(part.partIndex, run);
    }
  };
  const timer = setInterval(() => {
    look().catch(() => {
      // The next look tries again; a database outage fails the coordinator's own waits anyway.
    });
  }, 1000);
  return {
    async stop() {
      clearInterval(timer);
      stopped.abort();
      await Promise.all(running.values());
    },
  };
}

/** SHA-256 of a stored object, for a dataset registered before its hash was recorded. */
async function hashObject(objectKey: string): Promise<string> {
  const hash = createHash("sha256");
  const object = await getObjectStream(objectKey);
  for await (const chunk of object.body as AsyncIterable<Buffer>) hash.update(chunk);
  return hash.digest("hex");
}

/** Seconds per stage, from each stage's first report to the next stage's. */
function createStageClock() {
  const seconds: Record<string, number> = {};
  let current: { stage: string; since: number } | undefined;
  const close = (now: number) => {
    if (current) {
      seconds[current.stage] = (seconds[current.stage] ?? 0) + (now - current.since) / 1000;
    }
  };
  return {
    enter(stage: string) {
      if (current?.stage === stage) return;
      const now = performance.now();
      close(now);
      current = { stage, since: now };
    },
    finish() {
      close(performance.now());
      return seconds;
    },
  };
}
