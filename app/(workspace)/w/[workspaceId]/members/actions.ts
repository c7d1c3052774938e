"use server";

import { revalidatePath } from "next/cache";
import { createInvitation } from "@/db/queries/invitations";
import { updateMembership } from "@/db/queries/members";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { invitationMessage } from "@/lib/auth/emails";
import { requireRole } from "@/lib/auth/guards";
import { env } from "@/lib/env";
import { sendMail } from "@/lib/mail";
import { invitationSchema, roleChangeSchema } from "@/lib/validation/auth";

/** Owners invite people by e-mail with a role; the link in the e-mail is the only copy of the token. */
export async function inviteMember(
  workspaceId: string,
  input: { email: string; role: string },
): Promise<ActionResult<{ email: string }>> {
  try {
    const { user, workspace } = await requireRole(workspaceId, "manageMembers");
    const values = invitationSchema.parse(input);
    const { token, expiresAt } = await createInvitation({
      workspaceId,
      invitedBy: user.id,
      email: values.email,
      role: values.role,
    });
    await sendMail({
      to: values.email,
      ...invitationMessage({
        url: new URL(`/invite/${token}`, env().NEXTAUTH_URL).toString(),
        workspaceName: workspace.name,
        inviterName: user.name ?? user.email,
        role: values.role,
        expiresAt,
      }),
    });
    revalidatePath(`/w/${workspaceId}/members`);
    return succeed({ email: values.email });
  } catch (error) {
    return failWith(error, "invite-member");
  }
}

export async function changeMemberRole(
  workspaceId: string,
  input: { userId: string; role: string },
): Promise<ActionResult> {
  try {
    await requireRole(workspaceId, "manageMembers");
    const values = roleChangeSchema.parse(input);
    await updateMembership(workspaceId, values.userId, values.role);
    revalidatePath(`/w/${workspaceId}/members`);
    return succeed();
  } catch (error) {
    return failWith(error, "change-member-role");
  }
}

export async function removeMember(workspaceId: string, userId: string): Promise<ActionResult> {
  try {
    await requireRole(workspaceId, "manageMembers");
    await updateMembership(workspaceId, userId, null);
    revalidatePath(`/w/${workspaceId}/members`);
    return succeed();
  } catch (error) {
    return failWith(error, "remove-member");
  }
}
