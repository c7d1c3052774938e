import "server-only";
import { and, desc, eq, gt } from "drizzle-orm";
import { db } from "@/db/client";
import { memberships, pendingSignUps, users } from "@/db/schema";
import { createLinkToken, hashLinkToken } from "@/lib/auth/tokens";
import { RuleError } from "@/lib/errors";
import { endAllSessions } from "./sessions";
import { createOwnedWorkspace } from "./workspaces";

/** How long a confirmation link works; as long as an e-mail sign-in link. */
export const SIGN_UP_LINK_LIFETIME_MS = 24 * 60 * 60 * 1000;

export type PendingSignUpView = { email: string; expiresAt: Date };

export const expiredSignUpLink = () =>
  new RuleError(
    410,
    "This confirmation link has expired or was already used. Sign up again to get a new one.",
  );

/** Records a sign-up and returns the secret for its confirmation link (only its hash is kept). */
export async function createPendingSignUp(input: {
  email: string;
  name: string;
  passwordHash: string;
  workspaceName: string;
}): Promise<{ token: string; expiresAt: Date }> {
  const { token, tokenHash } = createLinkToken();
  const expiresAt = new Date(Date.now() + SIGN_UP_LINK_LIFETIME_MS);
  await db()
    .insert(pendingSignUps)
    .values({ ...input, email: input.email.toLowerCase(), tokenHash, expiresAt });
  return { token, expiresAt };
}

/** The sign-up a confirmation link belongs to, while it still works. */
export async function findPendingSignUp(token: string): Promise<PendingSignUpView | undefined> {
  const [row] = await db()
    .select({ email: pendingSignUps.email, expiresAt: pendingSignUps.expiresAt })
    .from(pendingSignUps)
    .where(
      and(
        eq(pendingSignUps.tokenHash, hashLinkToken(token)),
        gt(pendingSignUps.expiresAt, new Date()),
      ),
    );
  return row;
}

/** The password hash of the newest unconfirmed sign-up for an address, to tell its owner to confirm. */
export async function findPendingPasswordHash(email: string): Promise<string | undefined> {
  const [row] = await db()
    .select({ passwordHash: pendingSignUps.passwordHash })
    .from(pendingSignUps)
    .where(
      and(eq(pendingSignUps.email, email.toLowerCase()), gt(pendingSignUps.expiresAt, new Date())),
    )
    .orderBy(desc(pendingSignUps.createdAt))
    .limit(1);
  return row?.passwordHash;
}

/**
 * Following a confirmation link proves the address: the account is created with the password and
 * workspace chosen at sign-up. When an account for the address exists without a proven address
 * (made before addresses had to be proven), the proof resets it: the new password replaces any
 * earlier one and every session ends. Every other pending sign-up for the address is dropped.
 */
export async function confirmPendingSignUp(
  token: string,
): Promise<{ userId: string; email: string; workspaceId?: string }> {
  return db().transaction(async (tx) => {
    const [pending] = await tx
      .select()
      .from(pendingSignUps)
      .where(
        and(
          eq(pendingSignUps.tokenHash, hashLinkToken(token)),
          gt(pendingSignUps.expiresAt, new Date()),
        ),
      )
      .for("update");
    if (!pending) throw expiredSignUpLink();
    await tx.delete(pendingSignUps).where(eq(pendingSignUps.email, pending.email));
    const [existing] = await tx.select().from(users).where(eq(users.email, pending.email));
    if (existing?.emailVerified) {
      throw new RuleError(409, "An account with this e-mail already exists. Sign in instead.");
    }
    if (existing) {
      await tx
        .update(users)
        .set({
          passwordHash: pending.passwordHash,
          emailVerified: new Date(),
          name: existing.name ?? pending.name,
        })
        .where(eq(users.id, existing.id));
      await endAllSessions(existing.id, { tx });
      const [owned] = await tx
        .select({ workspaceId: memberships.workspaceId })
        .from(memberships)
        .where(and(eq(memberships.userId, existing.id), eq(memberships.role, "owner")));
      return { userId: existing.id, email: pending.email, workspaceId: owned?.workspaceId };
    }
    const [user] = await tx
      .insert(users)
      .values({
        name: pending.name,
        email: pending.email,
        passwordHash: pending.passwordHash,
        emailVerified: new Date(),
      })
      .returning({ id: users.id });
    const workspaceId = await createOwnedWorkspace(tx, user.id, pending.workspaceName);
    return { userId: user.id, email: pending.email, workspaceId };
  });
}

/**
 * An e-mail sign-in link proves the address too. If the account had no proven address, whatever
 * credential was set before the proof may be someone else's: its password is cleared and its
 * sessions end, and unconfirmed sign-ups for the address are dropped.
 */
export async function proveAddressByLink(email: string): Promise<void> {
  const address = email.toLowerCase();
  await db().transaction(async (tx) => {
    await tx.delete(pendingSignUps).where(eq(pendingSignUps.email, address));
    const [user] = await tx.select().from(users).where(eq(users.email, address));
    if (!user || user.emailVerified) return;
    await tx
      .update(users)
      .set({ passwordHash: null, emailVerified: new Date() })
      .where(eq(users.id, user.id));
    await endAllSessions(user.id, { tx });
  });
}
