import {
  bigint,
  doublePrecision,
  index,
  integer,
  json,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  text,
  uniqueIndex,
} from "drizzle-orm/pg-core";
import {
  cascadingReference,
  createdAt,
  instant,
  runProgressColumns,
  runStatusEnum,
  uuidPrimaryKey,
} from "./columns";
import type { AnalysisOptionsInput } from "@/lib/validation/analysis-options";
import type { CsvFormat, PartitionSummary, SimulationProgress } from "@/lib/analysis/browser";
import { users } from "./auth";
import { workspaces } from "./workspaces";

/** A dataset CSV, a layout (partition map CSV) or reference weights (JSON). */
export const dataFileKind = pgEnum("data_file_kind", ["dataset", "layout", "weights"]);

/** What a ranged read of the file's beginning showed: detected columns and the first rows. */
export type DataFilePreview = {
  columns: { name: string; type: "numeric" | "categorical" | "empty"; distinct: number }[];
  rows: string[][];
  /** True when the preview read stopped before the end of the file. */
  truncated: boolean;
  /**
   * How a CSV's text was read for the preview (detected at upload): the form offers these as the
   * choices. Absent for Parquet and weights, and for previews stored before it was recorded.
   */
  format?: CsvFormat;
};

/**
 * An object the browser uploaded straight to storage. A row exists only once the server has seen
 * the object in storage (HEAD), so every registered file can be read.
 */
export const dataFiles = pgTable(
  "data_files",
  {
    id: uuidPrimaryKey(),
    workspaceId: cascadingReference("workspace_id", () => workspaces.id),
    kind: dataFileKind("kind").notNull(),
    /** The name the user's file had; shown in the product and in messages. */
    name: text("name").notNull(),
    objectKey: text("object_key").notNull(),
    sizeBytes: bigint("size_bytes", { mode: "number" }).notNull(),
    contentType: text("content_type"),
    preview: jsonb("preview").$type<DataFilePreview>(),
    /**
     * SHA-256 of the stored bytes, read back when the file was registered, so uploading the same
     * bytes again reuses this file. Null for files registered before it was recorded.
     */
    sha256: text("sha256"),
    uploadedBy: text("uploaded_by")
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
  },
  (table) => [
    uniqueIndex("data_files_object_key_idx").on(table.objectKey),
    index("data_files_workspace_idx").on(table.workspaceId, table.kind),
    index("data_files_contents_idx").on(table.workspaceId, table.sha256),
  ],
);

export const analysisStatus = runStatusEnum("analysis_status");

/**
 * One requested run of the engine: its inputs and parameters, and its live state while the worker
 * runs it. Stage and fraction are written by the worker and polled by the browser.
 */
export const analyses = pgTable(
  "analyses",
  {
    id: uuidPrimaryKey(),
    workspaceId: cascadingReference("workspace_id", () => workspaces.id),
    title: text("title").notNull(),
    /** Null for a federated analysis: its report was merged from client digests, not read from a file. */
    datasetFileId: text("dataset_file_id").references(() => dataFiles.id),
    layoutFileId: text("layout_file_id").references(() => dataFiles.id),
    weightsFileId: text("weights_file_id").references(() => dataFiles.id),
    parameters: jsonb("parameters").$type<AnalysisOptionsInput>().notNull(),
    /** The report this run revises, when it is a re-run with other parameters. */
    previousReportId: text("previous_report_id"),
    ...runProgressColumns(analysisStatus),
    /**
     * The simulation's latest progress by algorithm, run and round (methods.md §7), written by the
     * worker once the engine's stages are done; null until then and without a simulation.
     */
    simulationProgress: jsonb("simulation_progress").$type<SimulationProgress>(),
    /** Why it failed, written for the user (the engine's input message), or null. */
    failureMessage: text("failure_message"),
    attempts: integer("attempts").notNull().default(0),
    jobId: text("job_id"),
    createdBy: text("created_by")
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
    startedAt: instant("started_at"),
    finishedAt: instant("finished_at"),
    /** Written by the worker every few seconds while it runs this analysis; a stale one means it died. */
    heartbeatAt: instant("heartbeat_at"),
    /** When a sweeper found this analysis's worker gone and handed the run back to the queue. */
    workerLostAt: instant("worker_lost_at"),
    /**
     * The memory limit (bytes) under which the run's rows went to a scratch file on the worker's
     * disk, for the report to say so; null when they stayed in memory.
     */
    rowsSpilledAtLimit: bigint("rows_spilled_at_limit", { mode: "number" }),
    /**
     * Why an analysis meant to be shared among several workers was read whole by one (a gzip file
     * cannot be cut, say), for the report to say so; null otherwise.
     */
    readWholeBecause: text("read_whole_because"),
    /** Since when the current run has been waiting for storage to answer again; null when it answers. */
    storageUnreachableSince: instant("storage_unreachable_since"),
  },
  (table) => [index("analyses_workspace_idx").on(table.workspaceId, table.createdAt)],
);

/** An input as it was analysed: which object, how big, and its SHA-256 computed while streaming. */
export type ReportInput = {
  kind: "dataset" | "layout" | "weights";
  name: string;
  objectKey: string;
  sizeBytes: number;
  sha256: string;
};

/**
 * The immutable result of one analysis. The unique analysis id makes a retried job unable to store a
 * second report; re-runs make a new row in the same lineage with the next version number.
 */
export const reports = pgTable(
  "reports",
  {
    id: uuidPrimaryKey(),
    workspaceId: cascadingReference("workspace_id", () => workspaces.id),
    analysisId: text("analysis_id")
      .notNull()
      .references(() => analyses.id),
    /** The first report of a line of revisions; equal to id for version 1. */
    lineageId: text("lineage_id").notNull(),
    version: integer("version").notNull(),
    previousReportId: text("previous_report_id"),
    title: text("title").notNull(),
    verdict: text("verdict").$type<PartitionSummary["advice"]["verdict"]>().notNull(),
    // The list's figures, copied from the summary when the report is stored: reading them from the
    // summary would make the list parse every report's whole summary (megabytes at 100,000 shards).
    /** ρ = local / minibatch bound (advice.ratio); null where it is undefined. */
    ratio: doublePrecision("ratio"),
    /** Rows kept (dataset.rows). */
    datasetRows: integer("dataset_rows").notNull(),
    shardCount: integer("shard_count").notNull(),
    // json, not jsonb: PostgreSQL keeps json text as written, so the exported summary has the CLI's
    // key order byte for byte (jsonb would reorder keys).
    summary: json("summary").$type<PartitionSummary>().notNull(),
    /**
     * The summary without its per-shard array (`shards: []`), for the report page's header and
     * figures: at 100,000 shards the whole summary is some 30 MB to parse, this a few kilobytes.
     * The shards are rows of report_shards.
     */
    summaryHeader: jsonb("summary_header").$type<PartitionSummary>().notNull(),
    parameters: jsonb("parameters").$type<AnalysisOptionsInput>().notNull(),
    inputs: jsonb("inputs").$type<ReportInput[]>().notNull(),
    engineVersion: text("engine_version").notNull(),
    /** Seconds per engine stage, plus the total. */
    timings: jsonb("timings").$type<Record<string, number>>().notNull(),
    authorId: text("author_id")
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
  },
  (table) => [
    uniqueIndex("reports_analysis_idx").on(table.analysisId),
    uniqueIndex("reports_lineage_version_idx").on(table.lineageId, table.version),
    index("reports_workspace_idx").on(table.workspaceId, table.createdAt),
  ],
);

/** The per-shard table of a report, one row per shard, for sorting and filtering in SQL. */
export const reportShards = pgTable(
  "report_shards",
  {
    reportId: cascadingReference("report_id", () => reports.id),
    ordinal: integer("ordinal").notNull(),
    shardId: text("shard_id").notNull(),
    rows: integer("rows").notNull(),
    tv: doublePrecision("tv").notNull(),
    hellinger: doublePrecision("hellinger").notNull(),
    js: doublePrecision("js").notNull(),
    kl: doublePrecision("kl").notNull(),
    gradNorm2: doublePrecision("grad_norm2").notNull(),
    sigma2: doublePrecision("sigma2").notNull(),
    loss: doublePrecision("loss").notNull(),
    classesPresent: integer("classes_present").notNull(),
    effectiveClasses: doublePrecision("effective_classes").notNull(),
    featureShift: doublePrecision("feature_shift").notNull(),
    /** Rows per label-skew category (the summary's labelCounts), for the label-mix chart. */
    labelCounts: json("label_counts").$type<number[]>().notNull(),
  },
  (table) => [primaryKey({ columns: [table.reportId, table.ordinal] })],
);
