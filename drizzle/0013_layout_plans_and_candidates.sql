CREATE TYPE "public"."layout_plan_status" AS ENUM('queued', 'running', 'succeeded', 'failed', 'cancelled');--> statement-breakpoint
CREATE TABLE "layout_candidates" (
	"plan_id" text NOT NULL,
	"ordinal" integer NOT NULL,
	"name" text NOT NULL,
	"generator" text NOT NULL,
	"parameters" jsonb NOT NULL,
	"status" "layout_plan_status" DEFAULT 'queued' NOT NULL,
	"stage" text,
	"fraction" double precision DEFAULT 0 NOT NULL,
	"summary" json,
	"map_object_key" text,
	"map_size_bytes" integer,
	"map_file_id" text,
	"failure_message" text,
	"failed_on_input" boolean DEFAULT false NOT NULL,
	"finished_at" timestamp with time zone,
	CONSTRAINT "layout_candidates_plan_id_ordinal_pk" PRIMARY KEY("plan_id","ordinal")
);
--> statement-breakpoint
CREATE TABLE "layout_plans" (
	"id" text PRIMARY KEY NOT NULL,
	"workspace_id" text NOT NULL,
	"title" text NOT NULL,
	"dataset_file_id" text NOT NULL,
	"options" jsonb NOT NULL,
	"group_column" text,
	"shard_count" integer NOT NULL,
	"generators" jsonb NOT NULL,
	"seed" bigint NOT NULL,
	"status" "layout_plan_status" DEFAULT 'queued' NOT NULL,
	"stage" text,
	"fraction" double precision DEFAULT 0 NOT NULL,
	"failure_message" text,
	"job_id" text,
	"created_by" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "layout_candidates" ADD CONSTRAINT "layout_candidates_plan_id_layout_plans_id_fk" FOREIGN KEY ("plan_id") REFERENCES "public"."layout_plans"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "layout_candidates" ADD CONSTRAINT "layout_candidates_map_file_id_data_files_id_fk" FOREIGN KEY ("map_file_id") REFERENCES "public"."data_files"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "layout_plans" ADD CONSTRAINT "layout_plans_workspace_id_workspaces_id_fk" FOREIGN KEY ("workspace_id") REFERENCES "public"."workspaces"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "layout_plans" ADD CONSTRAINT "layout_plans_dataset_file_id_data_files_id_fk" FOREIGN KEY ("dataset_file_id") REFERENCES "public"."data_files"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "layout_plans" ADD CONSTRAINT "layout_plans_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "layout_plans_workspace_idx" ON "layout_plans" USING btree ("workspace_id","created_at");