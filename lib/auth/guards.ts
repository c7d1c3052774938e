import "server-only";
import { cache } from "react";
import { findWorkspaceForMember, type WorkspaceSummary } from "@/db/queries/workspaces";
import { forbidden, notSignedIn, workspaceNotFound } from "./errors";
import { roleAllows, type Capability } from "./roles";
import { getSessionUser, type SessionUser } from "./session";

/** First line of every server action and route handler that needs a signed-in user. */
export async function requireUser(): Promise<SessionUser> {
  const user = await getSessionUser();
  if (!user) throw notSignedIn();
  return user;
}

/** Once per request: a page and its layout both ask (outside a render, every call asks). */
const findMembership = cache(findWorkspaceForMember);

/**
 * First line of every workspace-scoped action and handler. The role is read from the database on
 * every call, so a role change or removal takes effect at once rather than when a token expires.
 */
export async function requireRole(
  workspaceId: string,
  capability: Capability,
): Promise<{ user: SessionUser; workspace: WorkspaceSummary }> {
  const user = await requireUser();
  const workspace = await findMembership(user.id, workspaceId);
  if (!workspace) throw workspaceNotFound();
  if (!roleAllows(workspace.role, capability)) throw forbidden();
  return { user, workspace };
}
