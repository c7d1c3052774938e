import { index, pgTable, text, uniqueIndex } from "drizzle-orm/pg-core";
import { cascadingReference, createdAt, instant, uuidPrimaryKey } from "./columns";
import { users } from "./auth";
import { workspaces } from "./workspaces";

/**
 * A personal API token for pipelines: it acts for its user in one workspace, with the role the user
 * holds there at the time of each request. Only the SHA-256 of the token is kept; the token itself
 * is shown once, at creation, so a database leak cannot be turned into API access.
 */
export const apiTokens = pgTable(
  "api_tokens",
  {
    id: uuidPrimaryKey(),
    userId: cascadingReference("user_id", () => users.id),
    workspaceId: cascadingReference("workspace_id", () => workspaces.id),
    name: text("name").notNull(),
    tokenHash: text("token_hash").notNull(),
    expiresAt: instant("expires_at").notNull(),
    revokedAt: instant("revoked_at"),
    lastUsedAt: instant("last_used_at"),
    createdAt: createdAt(),
  },
  (table) => [
    uniqueIndex("api_tokens_token_hash_idx").on(table.tokenHash),
    index("api_tokens_workspace_user_idx").on(table.workspaceId, table.userId),
  ],
);
