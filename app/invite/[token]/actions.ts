"use server";

import { acceptInvitation } from "@/db/queries/invitations";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { requireUser } from "@/lib/auth/guards";

export async function acceptInvitationAction(
  token: string,
): Promise<ActionResult<{ landing: string }>> {
  try {
    const user = await requireUser();
    const { workspaceId } = await acceptInvitation({
      token,
      userId: user.id,
      userEmail: user.email,
    });
    return succeed({ landing: `/w/${workspaceId}` });
  } catch (error) {
    return failWith(error, "accept-invitation");
  }
}
