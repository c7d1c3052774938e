import "server-only";
import { eq } from "drizzle-orm";
import { db } from "@/db/client";
import { users } from "@/db/schema";
import { endAllSessions } from "./sessions";

export type UserRow = typeof users.$inferSelect;

export async function findUserByEmail(email: string): Promise<UserRow | undefined> {
  const [row] = await db().select().from(users).where(eq(users.email, email.toLowerCase()));
  return row;
}

export async function findUserById(id: string): Promise<UserRow | undefined> {
  const [row] = await db().select().from(users).where(eq(users.id, id));
  return row;
}

/**
 * Sets a new password and ends every session of the person, this browser's too: whoever knew the
 * old password may be signed in somewhere, and must not stay signed in.
 */
export async function replacePassword(userId: string, passwordHash: string): Promise<void> {
  await db().transaction(async (tx) => {
    await tx.update(users).set({ passwordHash }).where(eq(users.id, userId));
    await endAllSessions(userId, { tx });
  });
}
