import "server-only";
import { eq } from "drizzle-orm";
import { db } from "@/db/client";
import { users } from "@/db/schema";

export type UserRow = typeof users.$inferSelect;

export async function findUserByEmail(email: string): Promise<UserRow | undefined> {
  const [row] = await db().select().from(users).where(eq(users.email, email.toLowerCase()));
  return row;
}

export async function findUserById(id: string): Promise<UserRow | undefined> {
  const [row] = await db().select().from(users).where(eq(users.id, id));
  return row;
}
