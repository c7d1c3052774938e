import "server-only";
import { getServerSession } from "next-auth";
import { connection } from "next/server";
import { cache } from "react";
import { authOptions } from "./options";

export type SessionUser = { id: string; email: string; name: string | null };

/**
 * The signed-in user of the current request, or null. The one place that reads the session. Read
 * once per request (React's request cache): a page and its layout both guard, and each read
 * decrypts the cookie and checks the session row.
 */
export const getSessionUser = cache(async (): Promise<SessionUser | null> => {
  // Reading the session makes a page per-request; saying so first keeps `next build` from trying
  // to prerender it (and from needing runtime configuration at build time).
  await connection();
  const session = await getServerSession(authOptions());
  const user = session?.user;
  if (!user?.id || !user.email) return null;
  return { id: user.id, email: user.email, name: user.name ?? null };
});
