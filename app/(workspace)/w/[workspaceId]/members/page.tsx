import type { Metadata } from "next";
import { ConfirmActionButton } from "@/components/ui/confirm-action-button";
import { InviteForm } from "@/components/workspace/invite-form";
import { MemberControls } from "@/components/workspace/member-controls";
import { listPendingInvitations } from "@/db/queries/invitations";
import { listMembers } from "@/db/queries/members";
import { guardPage } from "@/lib/auth/page-guard";
import { ROLE_LABELS, roleAllows } from "@/lib/auth/roles";
import { changeMemberRole, inviteMember, removeMember, withdrawInvitationAction } from "./actions";

export const metadata: Metadata = { title: "Members" };

const dateFormat = new Intl.DateTimeFormat("en", { dateStyle: "medium" });

export default async function MembersPage({
  params,
}: {
  params: Promise<{ workspaceId: string }>;
}) {
  const { workspaceId } = await params;
  const { user, workspace } = await guardPage(
    workspaceId,
    "readWorkspace",
    `/w/${workspaceId}/members`,
  );
  const canManage = roleAllows(workspace.role, "manageMembers");
  const [members, pending] = await Promise.all([
    listMembers(user.id, workspaceId),
    canManage ? listPendingInvitations(workspaceId) : Promise.resolve([]),
  ]);
  return (
    <div className="grid gap-8 lg:grid-cols-[1.6fr_1fr]">
      {/* min-w-0 lets the grid column shrink to a phone's width; the table then scrolls inside. */}
      <section className="min-w-0 space-y-4">
        <h1 className="text-2xl font-semibold">Members</h1>
        <div className="relative overflow-x-auto rounded-lg border border-ink/10 bg-white">
          <table className="w-full text-sm">
            <thead className="bg-paper-deep text-left text-xs tracking-wide text-ink-soft uppercase">
              <tr>
                <th scope="col" className="px-4 py-2 font-medium">
                  Person
                </th>
                <th scope="col" className="px-4 py-2 font-medium">
                  Since
                </th>
                <th scope="col" className="px-4 py-2 text-right font-medium">
                  Role
                </th>
              </tr>
            </thead>
            <tbody className="divide-y divide-ink/5">
              {members.map((member) => (
                <tr key={member.userId}>
                  <td className="px-4 py-3">
                    <span className="block font-medium">
                      {member.name ?? member.email}
                      {member.userId === user.id ? (
                        <span className="ml-2 text-xs text-ink-soft">(you)</span>
                      ) : null}
                    </span>
                    <span className="block text-xs break-all text-ink-soft">{member.email}</span>
                  </td>
                  <td className="px-4 py-3 text-ink-soft">{dateFormat.format(member.since)}</td>
                  <td className="px-4 py-3 text-right">
                    {canManage ? (
                      <MemberControls
                        changeMemberRole={changeMemberRole.bind(null, workspaceId)}
                        removeMember={removeMember.bind(null, workspaceId, member.userId)}
                        userId={member.userId}
                        role={member.role}
                        label={member.name ?? member.email}
                      />
                    ) : (
                      ROLE_LABELS[member.role]
                    )}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        {canManage && pending.length > 0 ? (
          <div className="space-y-2">
            <h2 className="text-sm font-semibold">Waiting for a reply</h2>
            <ul className="divide-y divide-ink/5 rounded-lg border border-ink/10 bg-white text-sm">
              {pending.map((invitation) => (
                <li
                  key={invitation.id}
                  className="flex flex-wrap items-center justify-between gap-2 px-4 py-2"
                >
                  <span>
                    {invitation.email} · {ROLE_LABELS[invitation.role]}
                  </span>
                  <span className="flex items-center gap-3 text-ink-soft">
                    expires {dateFormat.format(invitation.expiresAt)}
                    <ConfirmActionButton
                      label="Withdraw"
                      confirmation={`Withdraw the invitation of ${invitation.email}? Its link stops working.`}
                      action={withdrawInvitationAction.bind(null, workspaceId, invitation.id)}
                    />
                  </span>
                </li>
              ))}
            </ul>
          </div>
        ) : null}
      </section>
      {canManage ? (
        <InviteForm inviteMember={inviteMember.bind(null, workspaceId)} />
      ) : (
        <p className="text-sm text-ink-soft">Only owners can invite people or change roles.</p>
      )}
    </div>
  );
}
