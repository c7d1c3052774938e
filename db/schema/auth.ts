import {
  bigint,
  integer,
  pgTable,
  primaryKey,
  text,
  timestamp,
  varchar,
} from "drizzle-orm/pg-core";
import { cascadingReference, createdAt, instant, uuidPrimaryKey } from "./columns";

/**
 * People who can sign in. The column set is what next-auth's Drizzle adapter expects, plus a
 * password hash for e-mail + password sign-in (null for people who only ever use e-mail links).
 * E-mail addresses are stored lower-cased so lookups never depend on how someone typed them.
 */
export const users = pgTable("users", {
  id: uuidPrimaryKey(),
  name: text("name"),
  email: text("email").notNull().unique(),
  emailVerified: timestamp("email_verified", { mode: "date", withTimezone: true }),
  image: text("image"),
  passwordHash: text("password_hash"),
  createdAt: createdAt(),
});

/** OAuth accounts; required by the adapter's contract although Partita signs in without OAuth. */
export const accounts = pgTable(
  "accounts",
  {
    userId: cascadingReference("user_id", () => users.id),
    type: text("type").notNull(),
    provider: text("provider").notNull(),
    providerAccountId: text("provider_account_id").notNull(),
    refresh_token: text("refresh_token"),
    access_token: text("access_token"),
    expires_at: integer("expires_at"),
    token_type: text("token_type"),
    scope: text("scope"),
    id_token: text("id_token"),
    session_state: text("session_state"),
  },
  (table) => [primaryKey({ columns: [table.provider, table.providerAccountId] })],
);

/**
 * Signed-in browsers (db/queries/sessions.ts). The adapter's table, used here beside next-auth's
 * JWT cookies: each cookie names a row, and deleting the row ends that session at once.
 */
export const sessions = pgTable("sessions", {
  sessionToken: text("session_token").primaryKey(),
  userId: cascadingReference("user_id", () => users.id),
  expires: timestamp("expires", { mode: "date", withTimezone: true }).notNull(),
});

/** One-time tokens behind e-mail sign-in links (stored hashed by next-auth). */
export const verificationTokens = pgTable(
  "verification_tokens",
  {
    identifier: text("identifier").notNull(),
    token: text("token").notNull(),
    expires: timestamp("expires", { mode: "date", withTimezone: true }).notNull(),
  },
  (table) => [primaryKey({ columns: [table.identifier, table.token] })],
);

/**
 * A sign-up waiting for its address to be proven. Nothing of the account exists until the link
 * e-mailed to the address is followed; the password chosen at sign-up is installed only then, so
 * nobody can set a password on an address they do not control.
 */
export const pendingSignUps = pgTable("pending_sign_ups", {
  id: uuidPrimaryKey(),
  email: text("email").notNull(),
  name: text("name").notNull(),
  passwordHash: text("password_hash").notNull(),
  workspaceName: text("workspace_name").notNull(),
  tokenHash: text("token_hash").notNull().unique(),
  expiresAt: instant("expires_at").notNull(),
  createdAt: createdAt(),
});

/**
 * Counters of every rate limit (sign-in, sign-up, e-mail links, API, notification mail), shared by
 * all app processes and the worker. The shape is the one rate-limiter-flexible's PostgreSQL store
 * reads and writes: key, points used, expiry in epoch milliseconds. Unlogged (migration 0016, by
 * hand: drizzle-kit cannot declare it), so the write every API request makes waits for no WAL flush.
 */
export const rateLimits = pgTable("rate_limits", {
  key: varchar("key", { length: 255 }).primaryKey(),
  points: integer("points").notNull().default(0),
  expire: bigint("expire", { mode: "number" }),
});
