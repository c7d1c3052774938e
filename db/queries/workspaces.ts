import "server-only";
import { and, asc, eq } from "drizzle-orm";
import { db, type Database } from "@/db/client";
import { memberships, users, workspaces } from "@/db/schema";
import type { Role } from "@/lib/auth/roles";

type Transaction = Parameters<Parameters<Database["transaction"]>[0]>[0];

/**
 * Creates an account with a proven address and its own workspace in one transaction: nobody is
 * ever left without one. Sign-up reaches this only through the confirmation link
 * (db/queries/pending-sign-ups.ts); the demo seed and tests use it directly.
 */
export async function createAccountWithWorkspace(input: {
  name: string;
  email: string;
  passwordHash: string | null;
  workspaceName: string;
}): Promise<{ userId: string; workspaceId: string }> {
  return db().transaction(async (tx) => {
    const [user] = await tx
      .insert(users)
      .values({
        name: input.name,
        email: input.email.toLowerCase(),
        passwordHash: input.passwordHash,
        emailVerified: new Date(),
      })
      .returning({ id: users.id });
    const workspaceId = await createOwnedWorkspace(tx, user.id, input.workspaceName);
    return { userId: user.id, workspaceId };
  });
}

export async function createOwnedWorkspace(
  tx: Transaction | Database,
  ownerId: string,
  name: string,
): Promise<string> {
  const [workspace] = await tx.insert(workspaces).values({ name }).returning({ id: workspaces.id });
  await tx
    .insert(memberships)
    .values({ workspaceId: workspace.id, userId: ownerId, role: "owner" });
  return workspace.id;
}

export type WorkspaceSummary = { id: string; name: string; role: Role };

/** The workspaces the user belongs to, oldest membership first (their own workspace leads). */
export async function listWorkspacesForUser(userId: string): Promise<WorkspaceSummary[]> {
  return db()
    .select({ id: workspaces.id, name: workspaces.name, role: memberships.role })
    .from(memberships)
    .innerJoin(workspaces, eq(workspaces.id, memberships.workspaceId))
    .where(eq(memberships.userId, userId))
    .orderBy(asc(memberships.createdAt));
}

/** The user's view of one workspace, or undefined when they are not a member. */
export async function findWorkspaceForMember(
  userId: string,
  workspaceId: string,
): Promise<WorkspaceSummary | undefined> {
  const [row] = await db()
    .select({ id: workspaces.id, name: workspaces.name, role: memberships.role })
    .from(memberships)
    .innerJoin(workspaces, eq(workspaces.id, memberships.workspaceId))
    .where(and(eq(memberships.userId, userId), eq(memberships.workspaceId, workspaceId)));
  return row;
}
