import "server-only";
import {
  claimFederatedCoordinator,
  findFederatedAnalysisById,
  listFederatedClients,
  moveFederatedState,
  recordCoordinatorHeartbeat,
  releaseFederatedCoordinator,
  type FederatedAnalysisRow,
  type FederatedClientRow,
} from "@/db/queries/federated-analyses";
import { listFederatedDigests, openExchange } from "@/db/queries/federated-digests";
import { listenToFederatedClient } from "@/db/queries/federated-notices";
import { storeFederatedReport } from "@/db/queries/federated-report";
import { COORDINATED_FEDERATED_STATES } from "@/db/schema/federated";
import {
  AnalysisInputError,
  analyzeFromDigests,
  mergeGradientDigests,
  schemaDigestSchema,
  type PartitionSummary,
} from "@/lib/analysis";
import { Doorbell } from "@/lib/doorbell";
import type { AnalysisOptionsInput } from "@/lib/validation/analysis-options";
import { DIGEST_CAUTION } from "./digest-caution";
import { orderRoster } from "./federated-rules";
import { collectFileDigests, filesRequestOf } from "./files-round";
import {
  AnalysisEndedError,
  ClientSilentError,
  FitSetAsideError,
  StoredClientConnection,
} from "./stored-client-connection";

export interface CoordinatorSettings {
  /** Aborted when the worker stops: the job is handed back and a later run replays the fit. */
  signal: AbortSignal;
  /** Whether pg-boss will run the job again after an unexpected error. */
  willRetry: boolean;
  /** The pg-boss job this run is, recorded so that a sweep can hand it back if the worker dies. */
  jobId: string;
  /** How often the coordinator records that it still works (lost-coordinators.ts). */
  heartbeatMs: number;
  silenceLimitMs?: number;
}

export type CoordinatorOutcome =
  | { outcome: "succeeded"; reportId: string }
  | { outcome: "failed"; message: string }
  /** Round-2 files are still missing: the last one to arrive queues the coordinator again. */
  | { outcome: "waiting" }
  | { outcome: "skipped" };

/**
 * The coordinator of one federated analysis, run by the worker once round 1 is merged: the
 * engine's own analyzeFromDigests over the clients that sent round 1 (in name order, the order the
 * encoding was merged in) — the fit of W* from their evaluations, round 2 at the reference point
 * and along t·W*, the merge into the §6 summary — or, for a reference that needs no fit, the merge
 * of round-2 files measured at it; and the summary stored as a normal report whose `digests` say
 * how many clients sent what and who was missing. A refusal of the engine ends the
 * analysis with its message; other errors are retried while pg-boss retries. While it works it
 * records a heartbeat, so that a sweep hands back the job of a worker that died.
 */
export async function runFederatedCoordinator(
  federatedAnalysisId: string,
  settings: CoordinatorSettings,
): Promise<CoordinatorOutcome> {
  const analysis = await findFederatedAnalysisById(federatedAnalysisId);
  if (
    !analysis ||
    !COORDINATED_FEDERATED_STATES.includes(analysis.state) ||
    analysis.encoding === null
  ) {
    return { outcome: "skipped" };
  }
  if (!(await claimFederatedCoordinator(federatedAnalysisId, settings.jobId))) {
    return { outcome: "skipped" };
  }
  const heartbeat = setInterval(() => {
    recordCoordinatorHeartbeat(federatedAnalysisId).catch((error: unknown) =>
      // One missed beat is harmless; a coordinator counts as lost only after several.
      console.error(
        `[federated ${federatedAnalysisId}] could not record a heartbeat:`,
        error instanceof Error ? error.message : error,
      ),
    );
  }, settings.heartbeatMs);
  try {
    return await coordinateAndStore(analysis, settings);
  } finally {
    clearInterval(heartbeat);
    await releaseFederatedCoordinator(federatedAnalysisId).catch((error: unknown) =>
      // Left set, the heartbeat goes stale and a sweep queues the analysis again: harmless.
      console.error(
        `[federated ${federatedAnalysisId}] could not release the analysis:`,
        error instanceof Error ? error.message : error,
      ),
    );
  }
}

/** The coordination, its report stored, or its end recorded (a refusal, or the last attempt). */
async function coordinateAndStore(
  analysis: FederatedAnalysisRow,
  settings: CoordinatorSettings,
): Promise<CoordinatorOutcome> {
  const federatedAnalysisId = analysis.id;
  const started = performance.now();
  try {
    const summary = await coordinate(analysis, settings);
    if (summary === null) return { outcome: "waiting" };
    const stored = await storeFederatedReport({
      federatedAnalysisId,
      summary,
      parameters: parametersOf(analysis),
      timings: { total: (performance.now() - started) / 1000 },
    });
    return stored.stored
      ? { outcome: "succeeded", reportId: stored.reportId }
      : { outcome: "skipped" };
  } catch (error) {
    if (error instanceof AnalysisEndedError) return { outcome: "skipped" };
    const final =
      error instanceof AnalysisInputError ||
      error instanceof ClientSilentError ||
      (!settings.willRetry && !settings.signal.aborted);
    if (!final) throw error;
    const message =
      error instanceof AnalysisInputError || error instanceof ClientSilentError
        ? error.message
        : "The coordinator failed on our side; start the analysis again.";
    await moveFederatedState(federatedAnalysisId, COORDINATED_FEDERATED_STATES, {
      state: "failed",
      failureMessage: message,
      finishedAt: new Date(),
    });
    return { outcome: "failed", message };
  }
}

/**
 * For a reference that needs no fit, round-2 files (made offline at that point) are taken as they
 * come: once one has arrived — before or during the fit — or a client stays silent through a
 * question of the fit, the fit is set aside and the files are merged (null while some are missing).
 */
async function coordinate(
  analysis: FederatedAnalysisRow,
  settings: CoordinatorSettings,
): Promise<PartitionSummary | null> {
  const roster = orderRoster(await listFederatedClients(analysis.id));
  const schemas = await listFederatedDigests(analysis.id, "schema");
  const participants = roster.filter((client) => schemas.has(client.id));
  const clients = {
    participants,
    schemas,
    missing: roster.filter((client) => !schemas.has(client.id)).map((client) => client.name),
  };
  const files = filesRequestOf(analysis);
  if (files === null) return fitAndMerge(analysis, clients, settings);
  const filesIn = async () =>
    (await collectFileDigests(analysis.id, participants, files.key)).digests.length > 0;
  if (await filesIn()) return mergeFiles(analysis, clients, files);
  try {
    return await fitAndMerge(analysis, clients, settings, filesIn);
  } catch (error) {
    if (!(error instanceof FitSetAsideError)) throw error;
    return mergeFiles(analysis, clients, files);
  }
}

interface Participants {
  /** The clients that sent round 1, in the order the encoding was merged in. */
  participants: FederatedClientRow[];
  schemas: Map<string, unknown>;
  /** Clients left out when the roster was closed. */
  missing: string[];
}

/** Looks for a client's answer again after this long without a notification. */
const LOOK_AGAIN_MS = 1000;

/** Every client online: the fit of W*, round 2 at the reference and along t·W*, the merge. */
async function fitAndMerge(
  analysis: FederatedAnalysisRow,
  { participants, schemas, missing }: Participants,
  settings: CoordinatorSettings,
  filesArrived?: () => Promise<boolean>,
): Promise<PartitionSummary> {
  const encoding = analysis.encoding!;
  // Ends the other clients' waits once one of them sets the fit aside or fails it.
  const ended = new AbortController();
  const signal = AbortSignal.any([settings.signal, ended.signal]);
  const clientSchemas = participants.map((client) =>
    schemaDigestSchema.parse(schemas.get(client.id)),
  );
  // Listening before the first question: every answer wakes the coordinator at once.
  const answers = participants.map(() => new Doorbell());
  const stopListening = await Promise.all(
    participants.map((client, index) =>
      listenToFederatedClient(
        { analysisId: analysis.id, clientId: client.id },
        ["answer", "state"],
        () => answers[index].ring(),
      ),
    ),
  );
  const connections = participants.map(
    (client, index) =>
      new StoredClientConnection({
        analysisId: analysis.id,
        client: { id: client.id, name: client.name },
        schema: clientSchemas[index],
        encodingHash: encoding.hash,
        signal,
        answers: answers[index],
        lookAgainMs: LOOK_AGAIN_MS,
        silenceLimitMs: settings.silenceLimitMs ?? 30 * 60_000,
        filesArrived,
      }),
  );
  // Progress writes go one after another, so a late one never moves the state back.
  let progress = Promise.resolve();
  const move = (state: FederatedAnalysisRow["state"], evaluations?: number) => {
    progress = progress.then(async () => {
      await moveFederatedState(analysis.id, COORDINATED_FEDERATED_STATES, {
        state,
        ...(evaluations === undefined ? {} : { evaluations }),
      });
    });
  };
  try {
    const summary = await analyzeFromDigests(connections, {
      task: analysis.task ?? undefined,
      lambda: analysis.lambda,
      reference: analysis.reference,
      plan: analysis.plan,
      minimumShardRows: analysis.minimumShardRows,
      missingClients: missing,
      onRound: (round, evaluations) => {
        if (round === "fit") move("fitting", evaluations);
        else if (round === "gradients") move("collecting-gradients");
        else if (round === "merge") move("merging");
      },
    });
    summary.preprocessing.warnings.push(DIGEST_CAUTION);
    return summary;
  } finally {
    ended.abort();
    for (const stop of stopListening) stop();
    await progress;
  }
}

/**
 * Round 2 as files at the reference point, no fit: the participants' files merged once all are
 * in. A participant without one is asked for it (an online client answers the request; a file
 * sent later answers it too), and the coordinator lets go until the last file queues it again.
 */
async function mergeFiles(
  analysis: FederatedAnalysisRow,
  { participants, missing }: Participants,
  files: NonNullable<ReturnType<typeof filesRequestOf>>,
): Promise<PartitionSummary | null> {
  const collected = await collectFileDigests(analysis.id, participants, files.key);
  for (const client of collected.missing) {
    await openExchange({
      federatedAnalysisId: analysis.id,
      clientId: client.id,
      kind: "gradients",
      requestKey: files.key,
      request: files.request,
    });
  }
  if (collected.missing.length > 0) {
    await moveFederatedState(analysis.id, COORDINATED_FEDERATED_STATES, {
      state: "collecting-gradients",
    });
    return null;
  }
  await moveFederatedState(analysis.id, COORDINATED_FEDERATED_STATES, { state: "merging" });
  const summary = mergeGradientDigests(analysis.encoding!, collected.digests, {
    lambda: analysis.lambda,
    plan: analysis.plan,
    missingClients: missing,
  });
  summary.preprocessing.warnings.push(DIGEST_CAUTION);
  return summary;
}

/** The options as a file analysis records them, so the report's parameters read the same way. */
function parametersOf(analysis: FederatedAnalysisRow): AnalysisOptionsInput {
  return {
    labelColumn: analysis.labelColumn,
    ...(analysis.features === null ? {} : { features: analysis.features }),
    ...(analysis.task === null ? {} : { task: analysis.task }),
    lambda: analysis.lambda,
    reference: analysis.reference,
    ...analysis.plan,
  };
}
