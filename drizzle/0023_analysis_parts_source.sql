ALTER TABLE "analysis_parts" ADD COLUMN "source_object_key" text;--> statement-breakpoint
ALTER TABLE "analysis_parts" ADD COLUMN "source_size_bytes" bigint;