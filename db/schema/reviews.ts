import {
  boolean,
  index,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  text,
  uniqueIndex,
  type AnyPgColumn,
} from "drizzle-orm/pg-core";
import { cascadingReference, createdAt, instant, uuidPrimaryKey } from "./columns";
import { reports } from "./analyses";
import { users } from "./auth";
import { workspaces } from "./workspaces";

/**
 * A request that one reviewer read one report version. One row per (version, reviewer): asking the
 * same person again is a no-op, and a new version starts with no requests at all.
 */
export const reviewRequests = pgTable(
  "review_requests",
  {
    id: uuidPrimaryKey(),
    workspaceId: cascadingReference("workspace_id", () => workspaces.id),
    reportId: cascadingReference("report_id", () => reports.id),
    reviewerId: cascadingReference("reviewer_id", () => users.id),
    requestedBy: cascadingReference("requested_by", () => users.id),
    note: text("note"),
    createdAt: createdAt(),
  },
  (table) => [
    uniqueIndex("review_requests_report_reviewer_idx").on(table.reportId, table.reviewerId),
    index("review_requests_workspace_idx").on(table.workspaceId),
  ],
);

export const commentAnchorKind = pgEnum("comment_anchor_kind", ["section", "shard"]);

/**
 * Comments on one report version. A reply names its thread's first comment in parentId; an anchor
 * pins a thread to a section of the page (e.g. "evidence") or to a shard id.
 */
export const reviewComments = pgTable(
  "review_comments",
  {
    id: uuidPrimaryKey(),
    workspaceId: cascadingReference("workspace_id", () => workspaces.id),
    reportId: cascadingReference("report_id", () => reports.id),
    parentId: text("parent_id").references((): AnyPgColumn => reviewComments.id, {
      onDelete: "cascade",
    }),
    anchorKind: commentAnchorKind("anchor_kind"),
    anchor: text("anchor"),
    body: text("body").notNull(),
    authorId: cascadingReference("author_id", () => users.id),
    /** User ids of the members the body mentions (resolved when the comment was written). */
    mentions: text("mentions").array().notNull().default([]),
    createdAt: createdAt(),
    /** When its author last changed the body; null while it reads as first written. */
    editedAt: instant("edited_at"),
    /**
     * When its author deleted it. The row stays, with its body emptied, so replies keep their
     * thread; the page says it was deleted and the audit log keeps who did it.
     */
    deletedAt: instant("deleted_at"),
  },
  (table) => [index("review_comments_report_idx").on(table.reportId, table.createdAt)],
);

/**
 * A reviewer either endorses the layout (the verdict and its evidence hold for the plan) or
 * returns the report for rework; lib/reviews/review-state.ts holds the words shown for each.
 */
export const REVIEW_DECISION_KINDS = ["endorse", "return"] as const;
export const reviewDecisionKind = pgEnum("review_decision_kind", REVIEW_DECISION_KINDS);

/**
 * A reviewer's decision on exactly one report version. A reviewer may decide again (the newest
 * row counts); earlier rows stay as the record of who decided what.
 */
export const reviewDecisions = pgTable(
  "review_decisions",
  {
    id: uuidPrimaryKey(),
    workspaceId: cascadingReference("workspace_id", () => workspaces.id),
    reportId: cascadingReference("report_id", () => reports.id),
    reviewerId: cascadingReference("reviewer_id", () => users.id),
    decision: reviewDecisionKind("decision").notNull(),
    reason: text("reason").notNull(),
    createdAt: createdAt(),
  },
  (table) => [index("review_decisions_report_idx").on(table.reportId, table.createdAt)],
);

/** Every kind of event the audit log records; the column is text so a new kind needs no migration. */
export const AUDIT_ACTIONS = [
  "member.invited",
  "member.invitation-withdrawn",
  "member.role-changed",
  "member.removed",
  "report.referred",
  "report.endorsed",
  "report.returned",
  "report.deleted",
  "comment.edited",
  "comment.deleted",
  "api-token.created",
  "api-token.revoked",
  "client-key.issued",
  "client-key.revoked",
  "federated.roster-closed",
  "federated.cancelled",
] as const;
export type AuditAction = (typeof AUDIT_ACTIONS)[number];

/**
 * The workspace's record of who did what. Append-only: the product has no update or delete path,
 * and the migration adds a trigger that makes PostgreSQL refuse UPDATE, DELETE and TRUNCATE.
 * Actor and workspace carry no foreign keys so that no cascade can ever try to remove an entry;
 * the actor's e-mail is copied in so the entry still reads after the account is gone.
 */
export const auditLog = pgTable(
  "audit_log",
  {
    id: uuidPrimaryKey(),
    workspaceId: text("workspace_id").notNull(),
    actorId: text("actor_id").notNull(),
    actorEmail: text("actor_email").notNull(),
    action: text("action").$type<AuditAction>().notNull(),
    targetType: text("target_type").notNull(),
    targetId: text("target_id").notNull(),
    details: jsonb("details").$type<Record<string, unknown>>().notNull().default({}),
    createdAt: createdAt(),
  },
  (table) => [
    index("audit_log_workspace_idx").on(table.workspaceId, table.createdAt),
    index("audit_log_workspace_action_idx").on(table.workspaceId, table.action),
  ],
);

export const NOTIFICATION_KINDS = [
  "referred",
  "decision-made",
  "mentioned",
  "analysis-finished",
] as const;
export type NotificationKind = (typeof NOTIFICATION_KINDS)[number];
export const notificationKind = pgEnum("notification_kind", NOTIFICATION_KINDS);

/** A user's choice per kind of e-mail. No row means the default: the e-mail is sent. */
export const notificationPreferences = pgTable(
  "notification_preferences",
  {
    userId: cascadingReference("user_id", () => users.id),
    kind: notificationKind("kind").notNull(),
    enabled: boolean("enabled").notNull(),
    updatedAt: instant("updated_at").notNull().defaultNow(),
  },
  (table) => [primaryKey({ columns: [table.userId, table.kind] })],
);
