import "server-only";
import { notFound, redirect } from "next/navigation";
import { AccessError } from "./errors";
import { requireRole } from "./guards";
import type { Capability } from "./roles";

/**
 * requireRole for pages: instead of an error, a signed-out visitor is sent to sign in and comes
 * back afterwards, a stranger sees "not found", and a member without the capability is told why on
 * the workspace's "not for your role" page (which names the page and the roles that may open it).
 */
export async function guardPage(workspaceId: string, capability: Capability, returnTo: string) {
  try {
    return await requireRole(workspaceId, capability);
  } catch (error) {
    if (!(error instanceof AccessError)) throw error;
    if (error.status === 401) redirect(`/sign-in?callbackUrl=${encodeURIComponent(returnTo)}`);
    if (error.status === 404) notFound();
    const query = new URLSearchParams({ need: capability, page: returnTo });
    redirect(`/w/${workspaceId}/not-for-your-role?${query}`);
  }
}
