import {
  bigint,
  index,
  integer,
  jsonb,
  pgTable,
  primaryKey,
  text,
  uniqueIndex,
} from "drizzle-orm/pg-core";
import { cascadingReference, createdAt, instant, uuidPrimaryKey } from "./columns";
import { analyses } from "./analyses";

/**
 * One part of an analysis shared by several workers: bytes [start, end) of whole lines of a CSV
 * (the header's bytes read first) or of whole row groups of a Parquet file (those beginning in the
 * range), read by whichever worker takes the part's job. `runId`
 * is the coordinating job's run: a retried coordinator starts a new run, and the parts of an older
 * run stop. The part's round-1 digest (methods.md §9) is kept here, so a worker that takes the
 * part over computes only what is still asked.
 */
export const analysisParts = pgTable(
  "analysis_parts",
  {
    analysisId: cascadingReference("analysis_id", () => analyses.id),
    runId: text("run_id").notNull(),
    partIndex: integer("part_index").notNull(),
    partCount: integer("part_count").notNull(),
    headerBytes: bigint("header_bytes", { mode: "number" }).notNull(),
    startByte: bigint("start_byte", { mode: "number" }).notNull(),
    endByte: bigint("end_byte", { mode: "number" }).notNull(),
    /** Runs of the part's job that took it; more than one means it was redone. */
    attempts: integer("attempts").notNull().default(0),
    /** Times the part was taken over after the worker holding it stopped sending heartbeats. */
    workerLosses: integer("worker_losses").notNull().default(0),
    /** The pg-boss job holding the part, so a sweeper can fail it when its worker is gone. */
    jobId: text("job_id"),
    /** The worker process holding the part (host and process id), for logs and tests. */
    heldBy: text("held_by"),
    /** Written every few seconds by the worker holding the part; null while nobody holds it. */
    heartbeatAt: instant("heartbeat_at"),
    /** Why the part cannot be read, for the user (the engine's input message); ends the analysis. */
    failureMessage: text("failure_message"),
    /**
     * The memory limit of the worker whose read of the part did not fit it, its rows kept in a
     * scratch file (for the report page); null while they fit.
     */
    rowsSpilledAtLimit: bigint("rows_spilled_at_limit", { mode: "number" }),
    schemaDigest: jsonb("schema_digest"),
    createdAt: createdAt(),
  },
  (table) => [primaryKey({ columns: [table.analysisId, table.runId, table.partIndex] })],
);

/**
 * A question of the coordinating job to one part (an evaluation of the fit, the Gram sum, round 2)
 * and the part's answer. Keyed by the request's hash, so a question is stored once and a part that
 * is redone answers only what is still open.
 */
export const analysisPartExchanges = pgTable(
  "analysis_part_exchanges",
  {
    id: uuidPrimaryKey(),
    analysisId: cascadingReference("analysis_id", () => analyses.id),
    runId: text("run_id").notNull(),
    partIndex: integer("part_index").notNull(),
    kind: text("kind").$type<"evaluate" | "gram" | "gradients">().notNull(),
    requestKey: text("request_key").notNull(),
    request: jsonb("request").notNull(),
    answer: jsonb("answer"),
    createdAt: createdAt(),
    answeredAt: instant("answered_at"),
  },
  (table) => [
    uniqueIndex("analysis_part_exchanges_request_idx").on(
      table.runId,
      table.partIndex,
      table.kind,
      table.requestKey,
    ),
    index("analysis_part_exchanges_open_idx").on(table.runId, table.partIndex, table.answeredAt),
  ],
);
