import {
  doublePrecision,
  index,
  integer,
  json,
  jsonb,
  pgEnum,
  pgTable,
  text,
  uniqueIndex,
} from "drizzle-orm/pg-core";
import { cascadingReference, createdAt, instant, uuidPrimaryKey } from "./columns";
import type { DigestEncoding } from "@/lib/analysis";
import type { ReferenceWeights } from "@/lib/validation/analysis-options";
import { users } from "./auth";
import { analyses, reports } from "./analyses";
import { workspaces } from "./workspaces";

/**
 * Where a federated analysis (methods.md §9) stands: round 1 until every expected client sent its
 * schema digest or the analyst closed the roster; then the coordinator (the worker) fits W* from
 * the clients' evaluations, asks round 2 and merges; done once its report is stored.
 */
export const FEDERATED_STATES = [
  "collecting-schemas",
  "encoding-ready",
  "fitting",
  "collecting-gradients",
  "merging",
  "done",
  "failed",
] as const;
export type FederatedState = (typeof FEDERATED_STATES)[number];
export const federatedState = pgEnum("federated_state", FEDERATED_STATES);

/** States after which nothing more is accepted from clients or the analyst. */
export const ENDED_FEDERATED_STATES: readonly FederatedState[] = ["done", "failed"];
/** Round 1 is merged and the analysis has not ended: a coordinator's job works on it. */
export const COORDINATED_FEDERATED_STATES: readonly FederatedState[] = [
  "encoding-ready",
  "fitting",
  "collecting-gradients",
  "merging",
];

/** The plan of methods.md §5 a federated analysis advises on (participants absent: all shards). */
export type FederatedPlan = {
  participants?: number;
  localSteps: number;
  rounds: number;
  batchSize: number;
};

/** A federated analysis in a workspace: its options, its state, and once merged its report. */
export const federatedAnalyses = pgTable(
  "federated_analyses",
  {
    id: uuidPrimaryKey(),
    workspaceId: cascadingReference("workspace_id", () => workspaces.id),
    title: text("title").notNull(),
    labelColumn: text("label_column").notNull(),
    /** The feature columns every client reads; null: all but label, id and shard columns. */
    features: jsonb("features").$type<string[]>(),
    task: text("task").$type<"classification" | "regression">(),
    lambda: doublePrecision("lambda").notNull(),
    /** The reference point: the pooled optimum, zero, or the team's current weights. */
    reference: jsonb("reference").$type<"optimum" | "zero" | ReferenceWeights>().notNull(),
    plan: jsonb("plan").$type<FederatedPlan>().notNull(),
    minimumShardRows: integer("minimum_shard_rows").notNull(),
    state: federatedState("state").notNull().default("collecting-schemas"),
    /** Set when the analyst went on without the clients still missing. */
    rosterClosedAt: instant("roster_closed_at"),
    /** The merged round 1 (json keeps its text as written: its hash is over this document). */
    encoding: json("encoding").$type<DigestEncoding>(),
    /** Evaluation rounds of the coordinator's fit so far (progress). */
    evaluations: integer("evaluations").notNull().default(0),
    failureMessage: text("failure_message"),
    /** The report this analysis revises (a new version in its lineage), if any. */
    previousReportId: text("previous_report_id").references(() => reports.id, {
      onDelete: "set null",
    }),
    /** The analyses row that carries the stored report (reports belong to analyses). */
    analysisId: text("analysis_id").references(() => analyses.id, { onDelete: "set null" }),
    reportId: text("report_id").references(() => reports.id, { onDelete: "set null" }),
    jobId: text("job_id"),
    /**
     * Set every heartbeat interval while a coordinator works on the analysis, cleared when it lets
     * go: a stale one means its worker died, and the sweeper hands the job back (lost-coordinators).
     */
    heartbeatAt: instant("heartbeat_at"),
    createdBy: text("created_by")
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
    finishedAt: instant("finished_at"),
  },
  (table) => [index("federated_analyses_workspace_idx").on(table.workspaceId, table.createdAt)],
);

/** The furthest step a client has taken. */
export const federatedRound = pgEnum("federated_round", ["none", "schema", "fit", "gradients"]);

/** An expected client of a federated analysis, and what it has sent so far (the roster). */
export const federatedClients = pgTable(
  "federated_clients",
  {
    id: uuidPrimaryKey(),
    federatedAnalysisId: cascadingReference("federated_analysis_id", () => federatedAnalyses.id),
    name: text("name").notNull(),
    /** Its shards and kept rows, from its schema digest. */
    shards: jsonb("shards").$type<string[]>().notNull().default([]),
    rows: integer("rows").notNull().default(0),
    roundReached: federatedRound("round_reached").notNull().default("none"),
    lastSeenAt: instant("last_seen_at"),
    /** Why its latest digest was refused (named client and shard), until one is accepted. */
    lastRefusal: text("last_refusal"),
    createdAt: createdAt(),
  },
  (table) => [uniqueIndex("federated_clients_name_idx").on(table.federatedAnalysisId, table.name)],
);

/**
 * A client key: lets one client of one federated analysis send its digests and read the encoding,
 * nothing else. Only the SHA-256 is kept; the key is shown once, when it is issued.
 */
export const federatedClientKeys = pgTable(
  "federated_client_keys",
  {
    id: uuidPrimaryKey(),
    clientId: cascadingReference("client_id", () => federatedClients.id),
    keyHash: text("key_hash").notNull(),
    expiresAt: instant("expires_at").notNull(),
    revokedAt: instant("revoked_at"),
    lastUsedAt: instant("last_used_at"),
    createdBy: text("created_by")
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
  },
  (table) => [
    uniqueIndex("federated_client_keys_hash_idx").on(table.keyHash),
    index("federated_client_keys_client_idx").on(table.clientId),
  ],
);

export const federatedDigestRound = pgEnum("federated_digest_round", ["schema", "gradients"]);

/** A digest a client sent and the service accepted: one per client and round, never overwritten. */
export const federatedDigests = pgTable(
  "federated_digests",
  {
    id: uuidPrimaryKey(),
    clientId: cascadingReference("client_id", () => federatedClients.id),
    round: federatedDigestRound("round").notNull(),
    // json, not jsonb: the document stays as the client wrote it (key order, number text).
    document: json("document").notNull(),
    sha256: text("sha256").notNull(),
    receivedAt: createdAt(),
  },
  (table) => [uniqueIndex("federated_digests_client_round_idx").on(table.clientId, table.round)],
);

export const federatedExchangeKind = pgEnum("federated_exchange_kind", [
  "evaluate",
  "gram",
  "gradients",
]);

/**
 * A question of the coordinator to one client, and its answer: an evaluation of the fit, the
 * Σx̃x̃ᵀ of a least-squares fit, or round 2 at the reference point. Kept once answered, so a
 * restarted coordinator replays the fit from them and a client that rejoins finds what is open.
 */
export const federatedExchanges = pgTable(
  "federated_exchanges",
  {
    id: uuidPrimaryKey(),
    federatedAnalysisId: cascadingReference("federated_analysis_id", () => federatedAnalyses.id),
    clientId: cascadingReference("client_id", () => federatedClients.id),
    kind: federatedExchangeKind("kind").notNull(),
    /** SHA-256 of the request's canonical JSON: the same question is asked once. */
    requestKey: text("request_key").notNull(),
    request: json("request").notNull(),
    answer: json("answer"),
    createdAt: createdAt(),
    answeredAt: instant("answered_at"),
  },
  (table) => [
    uniqueIndex("federated_exchanges_request_idx").on(table.clientId, table.kind, table.requestKey),
    index("federated_exchanges_open_idx").on(table.clientId, table.answeredAt),
  ],
);
