import { doublePrecision, pgEnum, text, timestamp, type AnyPgColumn } from "drizzle-orm/pg-core";

// Column shapes every table repeats, so a table definition shows what is particular to it.

/** A text primary key the application fills with a random UUID (ids are never guessable). */
export const uuidPrimaryKey = () =>
  text("id")
    .primaryKey()
    .$defaultFn(() => crypto.randomUUID());

/** A point in time, always with its time zone. */
export const instant = (name: string) => timestamp(name, { withTimezone: true });

/** When the row was written, set by PostgreSQL. */
export const createdAt = () => instant("created_at").notNull().defaultNow();

/** A required reference to a row whose deletion takes this one with it. */
export const cascadingReference = (name: string, target: () => AnyPgColumn) =>
  text(name).notNull().references(target, { onDelete: "cascade" });

/** The states of background work the worker runs (analyses, layout plans and their candidates). */
export const RUN_STATUSES = ["queued", "running", "succeeded", "failed", "cancelled"] as const;

/** A PostgreSQL enum of RUN_STATUSES, one per kind of background work. */
export const runStatusEnum = (name: string) => pgEnum(name, RUN_STATUSES);

/**
 * A run's live state, written by the worker and polled by its page: the status, the stage it is in
 * and how far through it (0 to 1).
 */
export const runProgressColumns = (status: ReturnType<typeof runStatusEnum>) => ({
  status: status("status").notNull().default("queued"),
  stage: text("stage"),
  fraction: doublePrecision("fraction").notNull().default(0),
});
