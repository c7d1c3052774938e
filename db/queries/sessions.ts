import "server-only";
import { and, eq, gt, lte, ne } from "drizzle-orm";
import { randomBytes } from "node:crypto";
import { db, type Database } from "@/db/client";
import { sessions } from "@/db/schema";

type Transaction = Parameters<Parameters<Database["transaction"]>[0]>[0];

/**
 * Server-side record of each signed-in browser. The session cookie is a signed token that names
 * one of these rows; a token whose row is gone no longer signs anyone in, which is how sign-out,
 * removal from a workspace and a password change end sessions at once.
 */
export async function openSession(userId: string, expires: Date): Promise<string> {
  const sessionId = randomBytes(24).toString("base64url");
  await db().transaction(async (tx) => {
    // Expired rows of this person go on each sign-in, so the table never grows without bound.
    await tx
      .delete(sessions)
      .where(and(eq(sessions.userId, userId), lte(sessions.expires, new Date())));
    await tx.insert(sessions).values({ sessionToken: sessionId, userId, expires });
  });
  return sessionId;
}

/** True while the session exists, belongs to the user and has not expired. */
export async function isSessionLive(
  sessionId: string,
  userId: string,
  now = new Date(),
): Promise<boolean> {
  const [row] = await db()
    .select({ userId: sessions.userId })
    .from(sessions)
    .where(
      and(
        eq(sessions.sessionToken, sessionId),
        eq(sessions.userId, userId),
        gt(sessions.expires, now),
      ),
    );
  return row !== undefined;
}

/** Sign-out: this browser's session only. */
export async function endSession(sessionId: string): Promise<void> {
  await db().delete(sessions).where(eq(sessions.sessionToken, sessionId));
}

/** Every session of the person, except the one that asked for it (e.g. a password change). */
export async function endAllSessions(
  userId: string,
  options: { keep?: string; tx?: Transaction } = {},
): Promise<void> {
  const where = options.keep
    ? and(eq(sessions.userId, userId), ne(sessions.sessionToken, options.keep))
    : eq(sessions.userId, userId);
  await (options.tx ?? db()).delete(sessions).where(where);
}
