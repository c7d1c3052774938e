import "server-only";
import { and, desc, eq, isNull } from "drizzle-orm";
import { db } from "@/db/client";
import { invitations, memberships, users, workspaces } from "@/db/schema";
import type { Role } from "@/lib/auth/roles";
import { createLinkToken, hashLinkToken } from "@/lib/auth/tokens";
import { RuleError } from "@/lib/errors";

export const INVITATION_LIFETIME_MS = 7 * 24 * 60 * 60 * 1000;

export type InvitationState = "pending" | "expired" | "accepted" | "revoked";

export type InvitationView = {
  id: string;
  workspaceId: string;
  workspaceName: string;
  email: string;
  role: Role;
  invitedByName: string | null;
  expiresAt: Date;
  state: InvitationState;
};

/**
 * Records an invitation and returns the secret token for the e-mail link (only its hash is kept).
 * A newer invitation to the same address replaces any pending one, so only the latest link works.
 */
export async function createInvitation(input: {
  workspaceId: string;
  invitedBy: string;
  email: string;
  role: Role;
  now?: Date;
}): Promise<{ token: string; expiresAt: Date }> {
  const now = input.now ?? new Date();
  const email = input.email.toLowerCase();
  return db().transaction(async (tx) => {
    const [existingMember] = await tx
      .select({ userId: memberships.userId })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(and(eq(memberships.workspaceId, input.workspaceId), eq(users.email, email)));
    if (existingMember) {
      throw new RuleError(409, `${email} is already a member of this workspace.`, "email");
    }
    await tx
      .update(invitations)
      .set({ revokedAt: now })
      .where(
        and(
          eq(invitations.workspaceId, input.workspaceId),
          eq(invitations.email, email),
          isNull(invitations.acceptedAt),
          isNull(invitations.revokedAt),
        ),
      );
    const { token, tokenHash } = createLinkToken();
    const expiresAt = new Date(now.getTime() + INVITATION_LIFETIME_MS);
    await tx.insert(invitations).values({
      workspaceId: input.workspaceId,
      email,
      role: input.role,
      tokenHash,
      invitedBy: input.invitedBy,
      expiresAt,
    });
    return { token, expiresAt };
  });
}

function stateOf(
  row: { acceptedAt: Date | null; revokedAt: Date | null; expiresAt: Date },
  now: Date,
): InvitationState {
  if (row.acceptedAt) return "accepted";
  if (row.revokedAt) return "revoked";
  if (row.expiresAt.getTime() <= now.getTime()) return "expired";
  return "pending";
}

/** Looks an invitation up by the token from its link; undefined when no such link was issued. */
export async function findInvitationByToken(
  token: string,
  now = new Date(),
): Promise<InvitationView | undefined> {
  const [row] = await db()
    .select({
      id: invitations.id,
      workspaceId: invitations.workspaceId,
      workspaceName: workspaces.name,
      email: invitations.email,
      role: invitations.role,
      invitedByName: users.name,
      expiresAt: invitations.expiresAt,
      acceptedAt: invitations.acceptedAt,
      revokedAt: invitations.revokedAt,
    })
    .from(invitations)
    .innerJoin(workspaces, eq(workspaces.id, invitations.workspaceId))
    .innerJoin(users, eq(users.id, invitations.invitedBy))
    .where(eq(invitations.tokenHash, hashLinkToken(token)));
  if (!row) return undefined;
  const { acceptedAt, revokedAt, ...view } = row;
  return { ...view, state: stateOf({ acceptedAt, revokedAt, expiresAt: row.expiresAt }, now) };
}

const STATE_MESSAGES: Record<Exclude<InvitationState, "pending">, string> = {
  expired: "This invitation has expired. Ask the workspace owner to send a new one.",
  accepted: "This invitation has already been used. Sign in to reach the workspace.",
  revoked: "This invitation was replaced by a newer one. Use the latest e-mail you received.",
};

export function describeInvitationState(state: InvitationState): string | undefined {
  return state === "pending" ? undefined : STATE_MESSAGES[state];
}

/**
 * Joins the signed-in user to the invitation's workspace. The invitation is locked for the
 * duration, so a link clicked twice at once still admits one person once.
 */
export async function acceptInvitation(input: {
  token: string;
  userId: string;
  userEmail: string;
  now?: Date;
}): Promise<{ workspaceId: string }> {
  const now = input.now ?? new Date();
  return db().transaction(async (tx) => {
    const [row] = await tx
      .select()
      .from(invitations)
      .where(eq(invitations.tokenHash, hashLinkToken(input.token)))
      .for("update");
    if (!row)
      throw new RuleError(
        404,
        "This invitation link is not valid. Check that you copied all of it.",
      );
    const state = stateOf(row, now);
    if (state !== "pending") throw new RuleError(410, STATE_MESSAGES[state]);
    if (row.email !== input.userEmail.toLowerCase()) {
      throw new RuleError(
        409,
        `This invitation was sent to ${row.email}, but you are signed in as ${input.userEmail}. Sign in with the invited address.`,
      );
    }
    await tx
      .insert(memberships)
      .values({ workspaceId: row.workspaceId, userId: input.userId, role: row.role })
      .onConflictDoNothing();
    await tx
      .update(invitations)
      .set({ acceptedAt: now, acceptedBy: input.userId })
      .where(eq(invitations.id, row.id));
    return { workspaceId: row.workspaceId };
  });
}

/**
 * Withdraws a pending invitation of this workspace: its link stops working at once. Undefined when
 * there is no such pending invitation (accepted, withdrawn or replaced already, or elsewhere).
 */
export async function withdrawInvitation(
  workspaceId: string,
  invitationId: string,
  now = new Date(),
): Promise<{ email: string; role: Role } | undefined> {
  const [withdrawn] = await db()
    .update(invitations)
    .set({ revokedAt: now })
    .where(
      and(
        eq(invitations.workspaceId, workspaceId),
        eq(invitations.id, invitationId),
        isNull(invitations.acceptedAt),
        isNull(invitations.revokedAt),
      ),
    )
    .returning({ email: invitations.email, role: invitations.role });
  return withdrawn;
}

/** Invitations of a workspace still waiting for their invitee, newest first. */
export async function listPendingInvitations(
  workspaceId: string,
  now = new Date(),
): Promise<{ id: string; email: string; role: Role; expiresAt: Date }[]> {
  const rows = await db()
    .select({
      id: invitations.id,
      email: invitations.email,
      role: invitations.role,
      expiresAt: invitations.expiresAt,
    })
    .from(invitations)
    .where(
      and(
        eq(invitations.workspaceId, workspaceId),
        isNull(invitations.acceptedAt),
        isNull(invitations.revokedAt),
      ),
    )
    .orderBy(desc(invitations.createdAt));
  return rows.filter((row) => row.expiresAt.getTime() > now.getTime());
}
