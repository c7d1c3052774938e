import { randomUUID } from "node:crypto";
import { db } from "@/db/client";
import { memberships } from "@/db/schema";
import { createAccountWithWorkspace } from "@/db/queries/workspaces";
import type { Role } from "@/lib/auth/roles";
import type { SessionUser } from "@/lib/auth/session";

/** A unique address per call, so tests never collide with each other or with earlier runs. */
export function uniqueEmail(label: string): string {
  return `${label}-${randomUUID().slice(0, 8)}@test.partita.local`;
}

/** A user with their own workspace (password sign-in is not needed for these tests). */
export async function createAccount(label: string): Promise<SessionUser & { workspaceId: string }> {
  const email = uniqueEmail(label);
  const { userId, workspaceId } = await createAccountWithWorkspace({
    name: `Test ${label}`,
    email,
    passwordHash: null,
    workspaceName: `${label}'s workspace`,
  });
  return { id: userId, email, name: `Test ${label}`, workspaceId };
}

/** A workspace with one member of each role, each also owning a workspace of their own. */
export async function createTeam() {
  const owner = await createAccount("owner");
  const analyst = await createAccount("analyst");
  const reviewer = await createAccount("reviewer");
  const workspaceId = owner.workspaceId;
  await db()
    .insert(memberships)
    .values([
      { workspaceId, userId: analyst.id, role: "analyst" as Role },
      { workspaceId, userId: reviewer.id, role: "reviewer" as Role },
    ]);
  return { workspaceId, owner, analyst, reviewer };
}
