CREATE TYPE "public"."analysis_status" AS ENUM('queued', 'running', 'succeeded', 'failed', 'cancelled');--> statement-breakpoint
CREATE TYPE "public"."data_file_kind" AS ENUM('dataset', 'layout', 'weights');--> statement-breakpoint
CREATE TABLE "analyses" (
	"id" text PRIMARY KEY NOT NULL,
	"workspace_id" text NOT NULL,
	"title" text NOT NULL,
	"dataset_file_id" text NOT NULL,
	"layout_file_id" text,
	"weights_file_id" text,
	"parameters" jsonb NOT NULL,
	"previous_report_id" text,
	"status" "analysis_status" DEFAULT 'queued' NOT NULL,
	"stage" text,
	"fraction" double precision DEFAULT 0 NOT NULL,
	"failure_message" text,
	"attempts" integer DEFAULT 0 NOT NULL,
	"job_id" text,
	"created_by" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"started_at" timestamp with time zone,
	"finished_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "data_files" (
	"id" text PRIMARY KEY NOT NULL,
	"workspace_id" text NOT NULL,
	"kind" "data_file_kind" NOT NULL,
	"name" text NOT NULL,
	"object_key" text NOT NULL,
	"size_bytes" bigint NOT NULL,
	"content_type" text,
	"preview" jsonb,
	"uploaded_by" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "report_shards" (
	"report_id" text NOT NULL,
	"ordinal" integer NOT NULL,
	"shard_id" text NOT NULL,
	"rows" integer NOT NULL,
	"tv" double precision NOT NULL,
	"hellinger" double precision NOT NULL,
	"js" double precision NOT NULL,
	"kl" double precision NOT NULL,
	"grad_norm2" double precision NOT NULL,
	"sigma2" double precision NOT NULL,
	"loss" double precision NOT NULL,
	"classes_present" integer NOT NULL,
	"effective_classes" double precision NOT NULL,
	"feature_shift" double precision NOT NULL,
	CONSTRAINT "report_shards_report_id_ordinal_pk" PRIMARY KEY("report_id","ordinal")
);
--> statement-breakpoint
CREATE TABLE "reports" (
	"id" text PRIMARY KEY NOT NULL,
	"workspace_id" text NOT NULL,
	"analysis_id" text NOT NULL,
	"lineage_id" text NOT NULL,
	"version" integer NOT NULL,
	"previous_report_id" text,
	"title" text NOT NULL,
	"verdict" text NOT NULL,
	"summary" jsonb NOT NULL,
	"parameters" jsonb NOT NULL,
	"inputs" jsonb NOT NULL,
	"engine_version" text NOT NULL,
	"timings" jsonb NOT NULL,
	"author_id" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
ALTER TABLE "analyses" ADD CONSTRAINT "analyses_workspace_id_workspaces_id_fk" FOREIGN KEY ("workspace_id") REFERENCES "public"."workspaces"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "analyses" ADD CONSTRAINT "analyses_dataset_file_id_data_files_id_fk" FOREIGN KEY ("dataset_file_id") REFERENCES "public"."data_files"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "analyses" ADD CONSTRAINT "analyses_layout_file_id_data_files_id_fk" FOREIGN KEY ("layout_file_id") REFERENCES "public"."data_files"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "analyses" ADD CONSTRAINT "analyses_weights_file_id_data_files_id_fk" FOREIGN KEY ("weights_file_id") REFERENCES "public"."data_files"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "analyses" ADD CONSTRAINT "analyses_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "data_files" ADD CONSTRAINT "data_files_workspace_id_workspaces_id_fk" FOREIGN KEY ("workspace_id") REFERENCES "public"."workspaces"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "data_files" ADD CONSTRAINT "data_files_uploaded_by_users_id_fk" FOREIGN KEY ("uploaded_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "report_shards" ADD CONSTRAINT "report_shards_report_id_reports_id_fk" FOREIGN KEY ("report_id") REFERENCES "public"."reports"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reports" ADD CONSTRAINT "reports_workspace_id_workspaces_id_fk" FOREIGN KEY ("workspace_id") REFERENCES "public"."workspaces"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reports" ADD CONSTRAINT "reports_analysis_id_analyses_id_fk" FOREIGN KEY ("analysis_id") REFERENCES "public"."analyses"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "reports" ADD CONSTRAINT "reports_author_id_users_id_fk" FOREIGN KEY ("author_id") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "analyses_workspace_idx" ON "analyses" USING btree ("workspace_id","created_at");--> statement-breakpoint
CREATE UNIQUE INDEX "data_files_object_key_idx" ON "data_files" USING btree ("object_key");--> statement-breakpoint
CREATE INDEX "data_files_workspace_idx" ON "data_files" USING btree ("workspace_id","kind");--> statement-breakpoint
CREATE UNIQUE INDEX "reports_analysis_idx" ON "reports" USING btree ("analysis_id");--> statement-breakpoint
CREATE UNIQUE INDEX "reports_lineage_version_idx" ON "reports" USING btree ("lineage_id","version");--> statement-breakpoint
CREATE INDEX "reports_workspace_idx" ON "reports" USING btree ("workspace_id","created_at");