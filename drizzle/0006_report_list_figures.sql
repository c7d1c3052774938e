ALTER TABLE "reports" ADD COLUMN "ratio" double precision;--> statement-breakpoint
ALTER TABLE "reports" ADD COLUMN "dataset_rows" integer;--> statement-breakpoint
ALTER TABLE "reports" ADD COLUMN "shard_count" integer;--> statement-breakpoint
-- Existing reports: the same figures from their stored summaries and per-shard tables, once.
UPDATE "reports" SET
  "ratio" = ("summary" -> 'advice' ->> 'ratio')::double precision,
  "dataset_rows" = ("summary" -> 'dataset' ->> 'rows')::integer,
  "shard_count" = (SELECT count(*) FROM "report_shards" WHERE "report_shards"."report_id" = "reports"."id");--> statement-breakpoint
ALTER TABLE "reports" ALTER COLUMN "dataset_rows" SET NOT NULL;--> statement-breakpoint
ALTER TABLE "reports" ALTER COLUMN "shard_count" SET NOT NULL;
