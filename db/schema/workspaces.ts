import { index, pgEnum, pgTable, primaryKey, text, uniqueIndex } from "drizzle-orm/pg-core";
import { cascadingReference, createdAt, instant, uuidPrimaryKey } from "./columns";
import { users } from "./auth";

/** Owners manage members and settings; analysts upload and analyse; reviewers read and decide. */
export const workspaceRole = pgEnum("workspace_role", ["owner", "analyst", "reviewer"]);

export const workspaces = pgTable("workspaces", {
  id: uuidPrimaryKey(),
  name: text("name").notNull(),
  createdAt: createdAt(),
});

export const memberships = pgTable(
  "memberships",
  {
    workspaceId: cascadingReference("workspace_id", () => workspaces.id),
    userId: cascadingReference("user_id", () => users.id),
    role: workspaceRole("role").notNull(),
    createdAt: createdAt(),
  },
  (table) => [
    primaryKey({ columns: [table.workspaceId, table.userId] }),
    index("memberships_user_idx").on(table.userId),
  ],
);

/**
 * An invitation carries only the SHA-256 of its token: the token itself lives in the e-mail link,
 * so a database leak cannot be turned into workspace access.
 */
export const invitations = pgTable(
  "invitations",
  {
    id: uuidPrimaryKey(),
    workspaceId: cascadingReference("workspace_id", () => workspaces.id),
    email: text("email").notNull(),
    role: workspaceRole("role").notNull(),
    tokenHash: text("token_hash").notNull(),
    invitedBy: cascadingReference("invited_by", () => users.id),
    expiresAt: instant("expires_at").notNull(),
    acceptedAt: instant("accepted_at"),
    acceptedBy: text("accepted_by").references(() => users.id, { onDelete: "set null" }),
    revokedAt: instant("revoked_at"),
    createdAt: createdAt(),
  },
  (table) => [
    uniqueIndex("invitations_token_hash_idx").on(table.tokenHash),
    index("invitations_workspace_idx").on(table.workspaceId),
  ],
);
