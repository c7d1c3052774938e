-- The review speaks its own words: a report is referred to reviewers, who endorse the layout or
-- return it for rework. Renaming the enum values converts every stored decision and preference.
ALTER TYPE "public"."review_decision_kind" RENAME VALUE 'approve' TO 'endorse';--> statement-breakpoint
ALTER TYPE "public"."review_decision_kind" RENAME VALUE 'changes-requested' TO 'return';--> statement-breakpoint
ALTER TYPE "public"."notification_kind" RENAME VALUE 'review-requested' TO 'referred';--> statement-breakpoint
-- The audit log is append-only for the product; this one-time vocabulary conversion lifts the guard
-- for its own statement only, renames the event kinds (a decision becomes endorsed or returned) and
-- the decision stored in their details, and restores the guard in the same transaction.
ALTER TABLE "audit_log" DISABLE TRIGGER "audit_log_no_update_or_delete";--> statement-breakpoint
UPDATE "audit_log" SET "action" = 'report.referred' WHERE "action" = 'review.requested';--> statement-breakpoint
UPDATE "audit_log"
SET
  "action" = CASE WHEN "details"->>'decision' = 'approve' THEN 'report.endorsed' ELSE 'report.returned' END,
  "details" = jsonb_set(
    "details",
    '{decision}',
    to_jsonb(CASE WHEN "details"->>'decision' = 'approve' THEN 'endorse' ELSE 'return' END)
  )
WHERE "action" = 'review.decided';--> statement-breakpoint
ALTER TABLE "audit_log" ENABLE TRIGGER "audit_log_no_update_or_delete";
