ALTER TABLE "data_files" ADD COLUMN "sha256" text;--> statement-breakpoint
CREATE INDEX "data_files_contents_idx" ON "data_files" USING btree ("workspace_id","sha256");