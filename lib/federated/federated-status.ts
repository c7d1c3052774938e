import "server-only";
import { listFederatedAnalyses, listFederatedClients } from "@/db/queries/federated-analyses";
import { listClientKeys, type ClientKeyListItem } from "@/db/queries/federated-client-keys";
import type { FederatedPlan } from "@/db/schema";
import type { ReferenceWeights } from "@/lib/validation/analysis-options";
import { orderRoster, requireFederatedAnalysis } from "./federated-rules";

/** One row of the roster page. */
export type RosterEntry = {
  client: string;
  shards: string[];
  rows: number;
  /** The furthest step: none, schema (round 1 sent), fit (answered evaluations), gradients. */
  round: "none" | "schema" | "fit" | "gradients";
  lastSeenAt: Date | null;
  /** Why its latest digest was refused, until one is accepted. */
  lastRefusal: string | null;
};

export type FederatedStatus = {
  id: string;
  title: string;
  state: string;
  labelColumn: string;
  features: string[] | null;
  task: "classification" | "regression" | null;
  lambda: number;
  reference: "optimum" | "zero" | "weights";
  referenceWeights: ReferenceWeights | null;
  plan: FederatedPlan;
  minimumShardRows: number;
  rosterClosedAt: Date | null;
  encodingHash: string | null;
  evaluations: number;
  failureMessage: string | null;
  reportId: string | null;
  createdAt: Date;
  finishedAt: Date | null;
  roster: RosterEntry[];
  /** Expected clients that sent nothing and were left out when the roster was closed. */
  missing: string[];
  keys: ClientKeyListItem[];
};

/** A federated analysis of this workspace with its roster and keys (never a key's hash); 404 else. */
export async function getFederatedStatus(
  workspaceId: string,
  analysisId: string,
): Promise<FederatedStatus> {
  const analysis = await requireFederatedAnalysis(workspaceId, analysisId);
  const [clients, keys] = await Promise.all([
    listFederatedClients(analysisId),
    listClientKeys(analysisId),
  ]);
  const roster = orderRoster(clients).map((client) => ({
    client: client.name,
    shards: client.shards,
    rows: client.rows,
    round: client.roundReached,
    lastSeenAt: client.lastSeenAt,
    lastRefusal: client.lastRefusal,
  }));
  const reference = analysis.reference;
  return {
    id: analysis.id,
    title: analysis.title,
    state: analysis.state,
    labelColumn: analysis.labelColumn,
    features: analysis.features,
    task: analysis.task,
    lambda: analysis.lambda,
    reference: typeof reference === "string" ? reference : "weights",
    referenceWeights: typeof reference === "string" ? null : reference,
    plan: analysis.plan,
    minimumShardRows: analysis.minimumShardRows,
    rosterClosedAt: analysis.rosterClosedAt,
    encodingHash: analysis.encoding?.hash ?? null,
    evaluations: analysis.evaluations,
    failureMessage: analysis.failureMessage,
    reportId: analysis.reportId,
    createdAt: analysis.createdAt,
    finishedAt: analysis.finishedAt,
    roster,
    missing:
      analysis.encoding === null
        ? []
        : roster.filter((entry) => entry.round === "none").map((entry) => entry.client),
    keys,
  };
}

/** The workspace's federated analyses, newest first (id, title, state, report, clients expected). */
export async function listFederatedAnalysesOf(workspaceId: string) {
  return listFederatedAnalyses(workspaceId);
}
