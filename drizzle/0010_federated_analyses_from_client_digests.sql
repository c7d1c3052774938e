CREATE TYPE "public"."federated_digest_round" AS ENUM('schema', 'gradients');--> statement-breakpoint
CREATE TYPE "public"."federated_exchange_kind" AS ENUM('evaluate', 'gram', 'gradients');--> statement-breakpoint
CREATE TYPE "public"."federated_round" AS ENUM('none', 'schema', 'fit', 'gradients');--> statement-breakpoint
CREATE TYPE "public"."federated_state" AS ENUM('collecting-schemas', 'encoding-ready', 'fitting', 'collecting-gradients', 'merging', 'done', 'failed');--> statement-breakpoint
CREATE TABLE "federated_analyses" (
	"id" text PRIMARY KEY NOT NULL,
	"workspace_id" text NOT NULL,
	"title" text NOT NULL,
	"label_column" text NOT NULL,
	"features" jsonb,
	"task" text,
	"lambda" double precision NOT NULL,
	"reference" jsonb NOT NULL,
	"plan" jsonb NOT NULL,
	"minimum_shard_rows" integer NOT NULL,
	"state" "federated_state" DEFAULT 'collecting-schemas' NOT NULL,
	"roster_closed_at" timestamp with time zone,
	"encoding" json,
	"evaluations" integer DEFAULT 0 NOT NULL,
	"failure_message" text,
	"previous_report_id" text,
	"analysis_id" text,
	"report_id" text,
	"job_id" text,
	"created_by" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"finished_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "federated_client_keys" (
	"id" text PRIMARY KEY NOT NULL,
	"client_id" text NOT NULL,
	"key_hash" text NOT NULL,
	"expires_at" timestamp with time zone NOT NULL,
	"revoked_at" timestamp with time zone,
	"last_used_at" timestamp with time zone,
	"created_by" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "federated_clients" (
	"id" text PRIMARY KEY NOT NULL,
	"federated_analysis_id" text NOT NULL,
	"name" text NOT NULL,
	"shards" jsonb DEFAULT '[]'::jsonb NOT NULL,
	"rows" integer DEFAULT 0 NOT NULL,
	"round_reached" "federated_round" DEFAULT 'none' NOT NULL,
	"last_seen_at" timestamp with time zone,
	"last_refusal" text,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "federated_digests" (
	"id" text PRIMARY KEY NOT NULL,
	"client_id" text NOT NULL,
	"round" "federated_digest_round" NOT NULL,
	"document" json NOT NULL,
	"sha256" text NOT NULL,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL
);
--> statement-breakpoint
CREATE TABLE "federated_exchanges" (
	"id" text PRIMARY KEY NOT NULL,
	"federated_analysis_id" text NOT NULL,
	"client_id" text NOT NULL,
	"kind" "federated_exchange_kind" NOT NULL,
	"request_key" text NOT NULL,
	"request" json NOT NULL,
	"answer" json,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"answered_at" timestamp with time zone
);
--> statement-breakpoint
ALTER TABLE "analyses" ALTER COLUMN "dataset_file_id" DROP NOT NULL;--> statement-breakpoint
ALTER TABLE "federated_analyses" ADD CONSTRAINT "federated_analyses_workspace_id_workspaces_id_fk" FOREIGN KEY ("workspace_id") REFERENCES "public"."workspaces"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "federated_analyses" ADD CONSTRAINT "federated_analyses_previous_report_id_reports_id_fk" FOREIGN KEY ("previous_report_id") REFERENCES "public"."reports"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "federated_analyses" ADD CONSTRAINT "federated_analyses_analysis_id_analyses_id_fk" FOREIGN KEY ("analysis_id") REFERENCES "public"."analyses"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "federated_analyses" ADD CONSTRAINT "federated_analyses_report_id_reports_id_fk" FOREIGN KEY ("report_id") REFERENCES "public"."reports"("id") ON DELETE set null ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "federated_analyses" ADD CONSTRAINT "federated_analyses_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "federated_client_keys" ADD CONSTRAINT "federated_client_keys_client_id_federated_clients_id_fk" FOREIGN KEY ("client_id") REFERENCES "public"."federated_clients"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "federated_client_keys" ADD CONSTRAINT "federated_client_keys_created_by_users_id_fk" FOREIGN KEY ("created_by") REFERENCES "public"."users"("id") ON DELETE no action ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "federated_clients" ADD CONSTRAINT "federated_clients_federated_analysis_id_federated_analyses_id_fk" FOREIGN KEY ("federated_analysis_id") REFERENCES "public"."federated_analyses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "federated_digests" ADD CONSTRAINT "federated_digests_client_id_federated_clients_id_fk" FOREIGN KEY ("client_id") REFERENCES "public"."federated_clients"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "federated_exchanges" ADD CONSTRAINT "federated_exchanges_federated_analysis_id_federated_analyses_id_fk" FOREIGN KEY ("federated_analysis_id") REFERENCES "public"."federated_analyses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "federated_exchanges" ADD CONSTRAINT "federated_exchanges_client_id_federated_clients_id_fk" FOREIGN KEY ("client_id") REFERENCES "public"."federated_clients"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE INDEX "federated_analyses_workspace_idx" ON "federated_analyses" USING btree ("workspace_id","created_at");--> statement-breakpoint
CREATE UNIQUE INDEX "federated_client_keys_hash_idx" ON "federated_client_keys" USING btree ("key_hash");--> statement-breakpoint
CREATE INDEX "federated_client_keys_client_idx" ON "federated_client_keys" USING btree ("client_id");--> statement-breakpoint
CREATE UNIQUE INDEX "federated_clients_name_idx" ON "federated_clients" USING btree ("federated_analysis_id","name");--> statement-breakpoint
CREATE UNIQUE INDEX "federated_digests_client_round_idx" ON "federated_digests" USING btree ("client_id","round");--> statement-breakpoint
CREATE UNIQUE INDEX "federated_exchanges_request_idx" ON "federated_exchanges" USING btree ("client_id","kind","request_key");--> statement-breakpoint
CREATE INDEX "federated_exchanges_open_idx" ON "federated_exchanges" USING btree ("client_id","answered_at");