ALTER TABLE "report_shards" ADD COLUMN "label_counts" json;--> statement-breakpoint
ALTER TABLE "reports" ADD COLUMN "summary_header" jsonb;--> statement-breakpoint
-- Existing reports, once: each shard's label counts from its stored summary (one pass over the
-- summary's shard array per report), and the summary without that array for the page header.
UPDATE "report_shards" SET "label_counts" = "shard"."value" -> 'labelCounts'
FROM "reports", json_array_elements("reports"."summary" -> 'shards') WITH ORDINALITY AS "shard"("value", "position")
WHERE "reports"."id" = "report_shards"."report_id" AND "shard"."position" = "report_shards"."ordinal" + 1;--> statement-breakpoint
UPDATE "reports" SET "summary_header" = jsonb_set("summary"::jsonb, '{shards}', '[]'::jsonb);--> statement-breakpoint
ALTER TABLE "report_shards" ALTER COLUMN "label_counts" SET NOT NULL;--> statement-breakpoint
ALTER TABLE "reports" ALTER COLUMN "summary_header" SET NOT NULL;
