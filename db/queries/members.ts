import "server-only";
import { and, asc, eq } from "drizzle-orm";
import { db } from "@/db/client";
import { memberships, users } from "@/db/schema";
import type { Role } from "@/lib/auth/roles";
import { RuleError } from "@/lib/errors";
import { endAllSessions } from "./sessions";

export type MemberView = {
  userId: string;
  name: string | null;
  email: string;
  role: Role;
  since: Date;
};

/** Members of a workspace, visible only to someone who belongs to it. */
export async function listMembers(actorId: string, workspaceId: string): Promise<MemberView[]> {
  const rows = await db()
    .select({
      userId: users.id,
      name: users.name,
      email: users.email,
      role: memberships.role,
      since: memberships.createdAt,
    })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.workspaceId, workspaceId))
    .orderBy(asc(memberships.createdAt));
  return rows.some((row) => row.userId === actorId) ? rows : [];
}

/**
 * Changes a member's role, or removes them when `role` is null. Runs under a row lock on the
 * workspace's memberships so two owners demoting each other at once cannot leave it ownerless.
 */
export async function updateMembership(
  workspaceId: string,
  userId: string,
  role: Role | null,
): Promise<void> {
  await db().transaction(async (tx) => {
    const members = await tx
      .select({ userId: memberships.userId, role: memberships.role })
      .from(memberships)
      .where(eq(memberships.workspaceId, workspaceId))
      .for("update");
    const target = members.find((member) => member.userId === userId);
    if (!target) throw new RuleError(404, "That person is not a member of this workspace.");
    const owners = members.filter((member) => member.role === "owner").length;
    if (target.role === "owner" && role !== "owner" && owners <= 1) {
      throw new RuleError(
        409,
        "A workspace needs at least one owner. Make someone else an owner first.",
      );
    }
    const where = and(eq(memberships.workspaceId, workspaceId), eq(memberships.userId, userId));
    if (role === null) {
      await tx.delete(memberships).where(where);
      // A removed person is signed out everywhere: whatever they had open of this workspace
      // (pages, forms, downloads in progress) stops at once, not on their next click.
      await endAllSessions(userId, { tx });
    } else await tx.update(memberships).set({ role }).where(where);
  });
}
