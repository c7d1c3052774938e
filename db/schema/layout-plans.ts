import {
  bigint,
  boolean,
  index,
  integer,
  json,
  jsonb,
  pgTable,
  primaryKey,
  text,
} from "drizzle-orm/pg-core";
import type { LayoutSpec, PartitionSummary } from "@/lib/analysis/browser";
import type { AnalysisOptionsInput } from "@/lib/validation/analysis-options";
import { dataFiles } from "./analyses";
import { users } from "./auth";
import {
  cascadingReference,
  createdAt,
  instant,
  runProgressColumns,
  runStatusEnum,
  uuidPrimaryKey,
} from "./columns";
import { workspaces } from "./workspaces";

export const layoutPlanStatus = runStatusEnum("layout_plan_status");

/**
 * A layout plan (methods.md §8): candidate splits of one registered dataset into M shards, each
 * scored with the full analysis under the same options. The worker reads and encodes the dataset
 * once and scores the candidates one after another on every core; `stage` and `fraction` are the
 * shared reading and encoding, the candidates' own progress is in layout_candidates.
 */
export const layoutPlans = pgTable(
  "layout_plans",
  {
    id: uuidPrimaryKey(),
    workspaceId: cascadingReference("workspace_id", () => workspaces.id),
    title: text("title").notNull(),
    datasetFileId: text("dataset_file_id")
      .notNull()
      .references(() => dataFiles.id),
    /** The analysis options every candidate is scored with: label, features, task, λ, the plan. */
    options: jsonb("options").$type<AnalysisOptionsInput>().notNull(),
    /** Rows sharing a value of this column stay in one shard under the group generators. */
    groupColumn: text("group_column"),
    /** M, the shards of every candidate. */
    shardCount: integer("shard_count").notNull(),
    generators: jsonb("generators").$type<LayoutSpec[]>().notNull(),
    /** The generators' seed, 0 … 2³² − 1. */
    seed: bigint("seed", { mode: "number" }).notNull(),
    ...runProgressColumns(layoutPlanStatus),
    /** Why the plan as a whole failed, written for the user, or null. */
    failureMessage: text("failure_message"),
    jobId: text("job_id"),
    /**
     * Set every heartbeat interval while a worker runs the plan: a running plan whose heartbeat went
     * stale has lost its worker and is handed back to the queue (lib/reports/lost-runs.ts).
     */
    heartbeatAt: instant("heartbeat_at"),
    createdBy: text("created_by")
      .notNull()
      .references(() => users.id),
    createdAt: createdAt(),
    startedAt: instant("started_at"),
    finishedAt: instant("finished_at"),
  },
  (table) => [index("layout_plans_workspace_idx").on(table.workspaceId, table.createdAt)],
);

/** One candidate of a plan: its generator, its own run state, and its result. */
export const layoutCandidates = pgTable(
  "layout_candidates",
  {
    planId: cascadingReference("plan_id", () => layoutPlans.id),
    /** The candidate's place in the plan's list of generators. */
    ordinal: integer("ordinal").notNull(),
    /** The generator with its parameter, e.g. "dirichlet-0.5" (also the map's file name). */
    name: text("name").notNull(),
    generator: text("generator").$type<LayoutSpec["generator"]>().notNull(),
    parameters: jsonb("parameters").$type<Record<string, number>>().notNull(),
    ...runProgressColumns(layoutPlanStatus),
    /** The §6 summary of this layout; json keeps the engine's key order for the export. */
    summary: json("summary").$type<PartitionSummary>(),
    /** Where the candidate's partition map (row_id,shard CSV) is stored. */
    mapObjectKey: text("map_object_key"),
    mapSizeBytes: integer("map_size_bytes"),
    /**
     * The map registered as a layout file once someone chose to analyse it. That file is a copy:
     * deleting it clears this link and leaves the candidate's own map (a later "analyse" registers
     * it again).
     */
    mapFileId: text("map_file_id").references(() => dataFiles.id, { onDelete: "set null" }),
    failureMessage: text("failure_message"),
    /** True when the candidate failed on its input (data, M, parameters), not on a defect. */
    failedOnInput: boolean("failed_on_input").notNull().default(false),
    finishedAt: instant("finished_at"),
  },
  (table) => [primaryKey({ columns: [table.planId, table.ordinal] })],
);
