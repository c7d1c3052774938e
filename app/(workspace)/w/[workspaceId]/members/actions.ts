"use server";

import { revalidatePath } from "next/cache";
import { recordAudit } from "@/db/queries/audit";
import { createInvitation, withdrawInvitation } from "@/db/queries/invitations";
import { listMembers, updateMembership } from "@/db/queries/members";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { invitationMessage } from "@/lib/auth/emails";
import { requireRole } from "@/lib/auth/guards";
import { env } from "@/lib/env";
import { RuleError } from "@/lib/errors";
import { queueMail } from "@/lib/mail";
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
    await recordAudit({
      workspaceId,
      actor: user,
      action: "member.invited",
      targetType: "invitation",
      targetId: values.email,
      details: { email: values.email, role: values.role },
    });
    await queueMail({
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
    const { user } = await requireRole(workspaceId, "manageMembers");
    const values = roleChangeSchema.parse(input);
    const before = await findMember(user.id, workspaceId, values.userId);
    await updateMembership(workspaceId, values.userId, values.role);
    await recordAudit({
      workspaceId,
      actor: user,
      action: "member.role-changed",
      targetType: "member",
      targetId: values.userId,
      details: { email: before?.email, from: before?.role, to: values.role },
    });
    revalidatePath(`/w/${workspaceId}/members`);
    return succeed();
  } catch (error) {
    return failWith(error, "change-member-role");
  }
}

export async function removeMember(workspaceId: string, userId: string): Promise<ActionResult> {
  try {
    const { user } = await requireRole(workspaceId, "manageMembers");
    const before = await findMember(user.id, workspaceId, userId);
    await updateMembership(workspaceId, userId, null);
    await recordAudit({
      workspaceId,
      actor: user,
      action: "member.removed",
      targetType: "member",
      targetId: userId,
      details: { email: before?.email, role: before?.role },
    });
    revalidatePath(`/w/${workspaceId}/members`);
    return succeed();
  } catch (error) {
    return failWith(error, "remove-member");
  }
}

/** Withdraws a pending invitation (owners only); its e-mailed link stops working at once. */
export async function withdrawInvitationAction(
  workspaceId: string,
  invitationId: string,
): Promise<ActionResult> {
  try {
    const { user, workspace } = await requireRole(workspaceId, "manageMembers");
    const withdrawn = await withdrawInvitation(workspace.id, invitationId);
    if (!withdrawn) {
      throw new RuleError(404, "That invitation was already accepted, withdrawn or replaced.");
    }
    await recordAudit({
      workspaceId: workspace.id,
      actor: user,
      action: "member.invitation-withdrawn",
      targetType: "invitation",
      targetId: invitationId,
      details: withdrawn,
    });
    revalidatePath(`/w/${workspace.id}/members`);
    return succeed();
  } catch (error) {
    return failWith(error, "withdraw-invitation");
  }
}

/** The member as they were before a change, so the audit entry can say who and from what. */
async function findMember(actorId: string, workspaceId: string, userId: string) {
  const members = await listMembers(actorId, workspaceId);
  return members.find((member) => member.userId === userId);
}
