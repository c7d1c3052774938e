ALTER TABLE "layout_candidates" DROP CONSTRAINT "layout_candidates_map_file_id_data_files_id_fk";
--> statement-breakpoint
ALTER TABLE "layout_candidates" ADD CONSTRAINT "layout_candidates_map_file_id_data_files_id_fk" FOREIGN KEY ("map_file_id") REFERENCES "public"."data_files"("id") ON DELETE set null ON UPDATE no action;