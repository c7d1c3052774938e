import "server-only";
import { and, asc, eq, inArray, isNull, lte, sql } from "drizzle-orm";
import { db } from "@/db/client";
import { mailOutbox } from "@/db/schema";

export type OutgoingMailRow = typeof mailOutbox.$inferSelect;

export async function insertOutgoingMail(mail: {
  recipients: string;
  subject: string;
  text: string;
  html?: string;
}): Promise<string> {
  const [row] = await db()
    .insert(mailOutbox)
    .values({ ...mail, html: mail.html ?? null })
    .returning({ id: mailOutbox.id });
  return row.id;
}

/**
 * Takes up to `limit` messages that are due, oldest first, and moves their next attempt
 * `leaseSeconds` ahead: a second sender skips them, and a sender that dies mid-send leaves them to
 * be taken again once the lease runs out (so a message is sent at least once, never lost).
 */
export async function claimDueMail(
  limit: number,
  leaseSeconds: number,
): Promise<OutgoingMailRow[]> {
  return db().transaction(async (tx) => {
    const due = await tx
      .select({ id: mailOutbox.id })
      .from(mailOutbox)
      .where(and(isNull(mailOutbox.sentAt), lte(mailOutbox.nextAttemptAt, sql`now()`)))
      .orderBy(asc(mailOutbox.createdAt))
      .limit(limit)
      .for("update", { skipLocked: true });
    if (due.length === 0) return [];
    return tx
      .update(mailOutbox)
      .set({ nextAttemptAt: sql`now() + make_interval(secs => ${leaseSeconds})` })
      .where(
        inArray(
          mailOutbox.id,
          due.map((row) => row.id),
        ),
      )
      .returning();
  });
}

export async function markMailSent(id: string): Promise<void> {
  await db()
    .update(mailOutbox)
    .set({ sentAt: sql`now()`, lastError: null, attempts: sql`${mailOutbox.attempts} + 1` })
    .where(eq(mailOutbox.id, id));
}

/** Records a failed attempt; the message is taken again after `retryInSeconds`. */
export async function markMailFailed(
  id: string,
  error: string,
  retryInSeconds: number,
): Promise<void> {
  await db()
    .update(mailOutbox)
    .set({
      lastError: error,
      attempts: sql`${mailOutbox.attempts} + 1`,
      nextAttemptAt: sql`now() + make_interval(secs => ${retryInSeconds})`,
    })
    .where(eq(mailOutbox.id, id));
}
