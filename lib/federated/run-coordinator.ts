import "server-only";
import {
  findFederatedAnalysisById,
  listFederatedClients,
  moveFederatedState,
  type FederatedAnalysisRow,
} from "@/db/queries/federated-analyses";
import { listFederatedDigests } from "@/db/queries/federated-digests";
import { storeFederatedReport } from "@/db/queries/federated-report";
import {
  AnalysisInputError,
  analyzeFromDigests,
  schemaDigestSchema,
  type PartitionSummary,
} from "@/lib/analysis";
import type { AnalysisOptionsInput } from "@/lib/validation/analysis-options";
import { DIGEST_CAUTION } from "./digest-caution";
import { orderRoster } from "./federated-rules";
import {
  AnalysisEndedError,
  ClientSilentError,
  StoredClientConnection,
} from "./stored-client-connection";

export interface CoordinatorSettings {
  /** Aborted when the worker stops: the job is handed back and a later run replays the fit. */
  signal: AbortSignal;
  /** Whether pg-boss will run the job again after an unexpected error. */
  willRetry: boolean;
  pollMs?: number;
  silenceLimitMs?: number;
}

export type CoordinatorOutcome =
  | { outcome: "succeeded"; reportId: string }
  | { outcome: "failed"; message: string }
  | { outcome: "skipped" };

const ACTIVE_STATES: FederatedAnalysisRow["state"][] = [
  "encoding-ready",
  "fitting",
  "collecting-gradients",
  "merging",
];

/**
 * The coordinator of one federated analysis, run by the worker once round 1 is merged: the
 * engine's own analyzeFromDigests over the clients that sent round 1 (in name order, the order the
 * encoding was merged in) — the fit of W* from their evaluations, round 2 at the reference point
 * and along t·W*, the merge into the §6 summary — and the summary stored as a normal report whose
 * `digests` say how many clients sent what and who was missing. A refusal of the engine ends the
 * analysis with its message; other errors are retried while pg-boss retries.
 */
export async function runFederatedCoordinator(
  federatedAnalysisId: string,
  settings: CoordinatorSettings,
): Promise<CoordinatorOutcome> {
  const analysis = await findFederatedAnalysisById(federatedAnalysisId);
  if (!analysis || !ACTIVE_STATES.includes(analysis.state) || analysis.encoding === null) {
    return { outcome: "skipped" };
  }
  const started = performance.now();
  try {
    const summary = await coordinate(analysis, settings);
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
    await moveFederatedState(federatedAnalysisId, ACTIVE_STATES, {
      state: "failed",
      failureMessage: message,
      finishedAt: new Date(),
    });
    return { outcome: "failed", message };
  }
}

async function coordinate(
  analysis: FederatedAnalysisRow,
  settings: CoordinatorSettings,
): Promise<PartitionSummary> {
  const encoding = analysis.encoding!;
  const roster = orderRoster(await listFederatedClients(analysis.id));
  const schemas = await listFederatedDigests(analysis.id, "schema");
  const participants = roster.filter((client) => schemas.has(client.id));
  const connections = participants.map(
    (client) =>
      new StoredClientConnection({
        analysisId: analysis.id,
        client: { id: client.id, name: client.name },
        schema: schemaDigestSchema.parse(schemas.get(client.id)),
        encodingHash: encoding.hash,
        signal: settings.signal,
        pollMs: settings.pollMs ?? 50,
        silenceLimitMs: settings.silenceLimitMs ?? 30 * 60_000,
      }),
  );
  // Progress writes go one after another, so a late one never moves the state back.
  let progress = Promise.resolve();
  const move = (state: FederatedAnalysisRow["state"], evaluations?: number) => {
    progress = progress.then(async () => {
      await moveFederatedState(analysis.id, ACTIVE_STATES, {
        state,
        ...(evaluations === undefined ? {} : { evaluations }),
      });
    });
  };
  const summary = await analyzeFromDigests(connections, {
    task: analysis.task ?? undefined,
    lambda: analysis.lambda,
    reference: analysis.reference,
    plan: analysis.plan,
    minimumShardRows: analysis.minimumShardRows,
    missingClients: roster.filter((client) => !schemas.has(client.id)).map((client) => client.name),
    onRound: (round, evaluations) => {
      if (round === "fit") move("fitting", evaluations);
      else if (round === "gradients") move("collecting-gradients");
      else if (round === "merge") move("merging");
    },
  });
  await progress;
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
