import { sql } from "drizzle-orm";
import { index, integer, pgTable, text } from "drizzle-orm/pg-core";
import { createdAt, instant, uuidPrimaryKey } from "./columns";

/**
 * E-mail waiting to go out. Actions write a row and return at once; the worker's sender delivers
 * it over SMTP, and while the relay is down keeps it and tries again later, so an action never
 * waits for SMTP and no message is lost.
 */
export const mailOutbox = pgTable(
  "mail_outbox",
  {
    id: uuidPrimaryKey(),
    /** Recipients, comma-separated as in a To header. */
    recipients: text("recipients").notNull(),
    subject: text("subject").notNull(),
    text: text("text").notNull(),
    html: text("html"),
    createdAt: createdAt(),
    /** When the sender may next take it: now for a new message, later after a failure or a claim. */
    nextAttemptAt: instant("next_attempt_at").notNull().defaultNow(),
    attempts: integer("attempts").notNull().default(0),
    /** The last failure's message (never shown to users; no address in it). */
    lastError: text("last_error"),
    sentAt: instant("sent_at"),
  },
  (table) => [
    index("mail_outbox_due_idx")
      .on(table.nextAttemptAt)
      .where(sql`sent_at is null`),
  ],
);
