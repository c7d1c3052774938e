import "server-only";
import { and, desc, eq, isNull, lt, ne, or } from "drizzle-orm";
import { db } from "@/db/client";
import { apiTokens, memberships, users, workspaces } from "@/db/schema";
import type { Role } from "@/lib/auth/roles";

// Token rows are personal: every function that lists or changes them takes the workspace, and the
// acting user unless the caller has checked that an owner is overseeing the workspace's tokens.

/** What the tokens page shows of a token: never its hash. */
export type ApiTokenListItem = {
  id: string;
  name: string;
  expiresAt: Date;
  revokedAt: Date | null;
  lastUsedAt: Date | null;
  createdAt: Date;
};

const listColumns = {
  id: apiTokens.id,
  name: apiTokens.name,
  expiresAt: apiTokens.expiresAt,
  revokedAt: apiTokens.revokedAt,
  lastUsedAt: apiTokens.lastUsedAt,
  createdAt: apiTokens.createdAt,
};

export async function insertApiToken(values: {
  workspaceId: string;
  userId: string;
  name: string;
  tokenHash: string;
  expiresAt: Date;
}): Promise<ApiTokenListItem> {
  const [inserted] = await db().insert(apiTokens).values(values).returning(listColumns);
  return inserted;
}

/** The user's tokens in this workspace, newest first, revoked and expired ones included. */
export async function listApiTokens(
  workspaceId: string,
  userId: string,
): Promise<ApiTokenListItem[]> {
  return db()
    .select(listColumns)
    .from(apiTokens)
    .where(and(eq(apiTokens.workspaceId, workspaceId), eq(apiTokens.userId, userId)))
    .orderBy(desc(apiTokens.createdAt));
}

/** Other members' tokens in this workspace, for an owner's oversight: with whose they are. */
export async function listOthersApiTokens(
  workspaceId: string,
  exceptUserId: string,
): Promise<(ApiTokenListItem & { holderEmail: string })[]> {
  return db()
    .select({ ...listColumns, holderEmail: users.email })
    .from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(and(eq(apiTokens.workspaceId, workspaceId), ne(apiTokens.userId, exceptUserId)))
    .orderBy(desc(apiTokens.createdAt));
}

/**
 * Revokes a live token of this workspace: only the user's own (`holderId`), or anyone's when the
 * caller has checked the actor may oversee every token (`holderId: "anyone"`). Undefined when
 * there is no such live token.
 */
export async function revokeApiToken(
  workspaceId: string,
  holderId: string | "anyone",
  tokenId: string,
  now = new Date(),
): Promise<{ name: string; holderEmail: string } | undefined> {
  const conditions = [
    eq(apiTokens.id, tokenId),
    eq(apiTokens.workspaceId, workspaceId),
    isNull(apiTokens.revokedAt),
  ];
  if (holderId !== "anyone") conditions.push(eq(apiTokens.userId, holderId));
  const [revoked] = await db()
    .update(apiTokens)
    .set({ revokedAt: now })
    .from(users)
    .where(and(eq(users.id, apiTokens.userId), ...conditions))
    .returning({ name: apiTokens.name, holderEmail: users.email });
  return revoked;
}

/**
 * What a presented token grants: its user and workspace, with the role the user holds there now
 * (null once they left the workspace). The caller decides about expiry and revocation so that it
 * can say which one applies.
 */
export type ApiTokenGrant = {
  tokenId: string;
  tokenName: string;
  expiresAt: Date;
  revokedAt: Date | null;
  lastUsedAt: Date | null;
  user: { id: string; email: string; name: string | null };
  workspace: { id: string; name: string };
  role: Role | null;
};

export async function findApiTokenGrant(tokenHash: string): Promise<ApiTokenGrant | undefined> {
  const [row] = await db()
    .select({
      tokenId: apiTokens.id,
      tokenName: apiTokens.name,
      expiresAt: apiTokens.expiresAt,
      revokedAt: apiTokens.revokedAt,
      lastUsedAt: apiTokens.lastUsedAt,
      userId: users.id,
      email: users.email,
      userName: users.name,
      workspaceId: workspaces.id,
      workspaceName: workspaces.name,
      role: memberships.role,
    })
    .from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .innerJoin(workspaces, eq(workspaces.id, apiTokens.workspaceId))
    .leftJoin(
      memberships,
      and(
        eq(memberships.workspaceId, apiTokens.workspaceId),
        eq(memberships.userId, apiTokens.userId),
      ),
    )
    .where(eq(apiTokens.tokenHash, tokenHash));
  if (!row) return undefined;
  return {
    tokenId: row.tokenId,
    tokenName: row.tokenName,
    expiresAt: row.expiresAt,
    revokedAt: row.revokedAt,
    lastUsedAt: row.lastUsedAt,
    user: { id: row.userId, email: row.email, name: row.userName },
    workspace: { id: row.workspaceId, name: row.workspaceName },
    role: row.role,
  };
}

/** The "last used" a token shows is this fine; a write on every request would cost each API call a disk flush. */
export const TOKEN_USE_RESOLUTION_MS = 60_000;

/**
 * Records that the token was used, unless a use within the last minute is already recorded (the
 * condition makes concurrent requests of one token write once, not once each).
 */
export async function recordApiTokenUse(tokenId: string, now = new Date()): Promise<void> {
  const recentEnough = new Date(now.getTime() - TOKEN_USE_RESOLUTION_MS);
  await db()
    .update(apiTokens)
    .set({ lastUsedAt: now })
    .where(
      and(
        eq(apiTokens.id, tokenId),
        or(isNull(apiTokens.lastUsedAt), lt(apiTokens.lastUsedAt, recentEnough)),
      ),
    );
}
