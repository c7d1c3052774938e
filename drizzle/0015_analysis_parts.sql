CREATE TABLE "analysis_part_exchanges" (
	"id" text PRIMARY KEY NOT NULL,
	"analysis_id" text NOT NULL,
	"run_id" text NOT NULL,
	"part_index" integer NOT NULL,
	"kind" text NOT NULL,
	"request_key" text NOT NULL,
	"request" jsonb NOT NULL,
	"answer" jsonb,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	"answered_at" timestamp with time zone
);
--> statement-breakpoint
CREATE TABLE "analysis_parts" (
	"analysis_id" text NOT NULL,
	"run_id" text NOT NULL,
	"part_index" integer NOT NULL,
	"part_count" integer NOT NULL,
	"header_bytes" bigint NOT NULL,
	"start_byte" bigint NOT NULL,
	"end_byte" bigint NOT NULL,
	"attempts" integer DEFAULT 0 NOT NULL,
	"worker_losses" integer DEFAULT 0 NOT NULL,
	"job_id" text,
	"held_by" text,
	"heartbeat_at" timestamp with time zone,
	"failure_message" text,
	"schema_digest" jsonb,
	"created_at" timestamp with time zone DEFAULT now() NOT NULL,
	CONSTRAINT "analysis_parts_analysis_id_run_id_part_index_pk" PRIMARY KEY("analysis_id","run_id","part_index")
);
--> statement-breakpoint
ALTER TABLE "analysis_part_exchanges" ADD CONSTRAINT "analysis_part_exchanges_analysis_id_analyses_id_fk" FOREIGN KEY ("analysis_id") REFERENCES "public"."analyses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
ALTER TABLE "analysis_parts" ADD CONSTRAINT "analysis_parts_analysis_id_analyses_id_fk" FOREIGN KEY ("analysis_id") REFERENCES "public"."analyses"("id") ON DELETE cascade ON UPDATE no action;--> statement-breakpoint
CREATE UNIQUE INDEX "analysis_part_exchanges_request_idx" ON "analysis_part_exchanges" USING btree ("run_id","part_index","kind","request_key");--> statement-breakpoint
CREATE INDEX "analysis_part_exchanges_open_idx" ON "analysis_part_exchanges" USING btree ("run_id","part_index","answered_at");