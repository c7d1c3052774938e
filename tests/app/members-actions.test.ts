import { afterAll, describe, expect, it, vi } from "vitest";

vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));
// revalidatePath needs Next's request context, which a unit test does not have.
vi.mock("next/cache", () => ({ revalidatePath: () => undefined }));

import { acceptInvitationAction } from "@/app/invite/[token]/actions";
import {
  changeMemberRole,
  inviteMember,
  removeMember,
  withdrawInvitationAction,
} from "@/app/(workspace)/w/[workspaceId]/members/actions";
import { closeDb } from "@/db/client";
import { listAuditEntries } from "@/db/queries/audit";
import { listMembers } from "@/db/queries/members";
import {
  acceptInvitation,
  createInvitation,
  findInvitationByToken,
  listPendingInvitations,
} from "@/db/queries/invitations";
import { createAccount, createTeam, uniqueEmail } from "@/tests/support/accounts";
import { actAs } from "@/tests/support/fake-session";
import { waitForMessage } from "@/tests/support/mailbox";

afterAll(closeDb);

const statusOf = (result: { ok: boolean; status?: number }) => (result.ok ? 200 : result.status);

/** The link in an invitation e-mail, read from the SMTP fake's mailbox as a user would. */
async function invitationLinkFor(email: string): Promise<string> {
  const message = await waitForMessage(email, / invited you to /);
  const link = message.text.match(/https?:\/\/\S+\/invite\/[\w-]+/)?.[0];
  if (!link) throw new Error(`the invitation e-mail to ${email} holds no link:\n${message.text}`);
  return link;
}

describe("member actions: role matrix", () => {
  it("lets only owners invite, change roles and remove; others get 403", async () => {
    const team = await createTeam();
    const { workspaceId } = team;
    for (const role of ["analyst", "reviewer"] as const) {
      actAs(team[role]);
      expect(
        statusOf(await inviteMember(workspaceId, { email: uniqueEmail("x"), role: "analyst" })),
      ).toBe(403);
      expect(
        statusOf(await changeMemberRole(workspaceId, { userId: team.reviewer.id, role: "owner" })),
      ).toBe(403);
      expect(statusOf(await removeMember(workspaceId, team.owner.id))).toBe(403);
    }
    actAs(team.owner);
    expect(
      statusOf(await inviteMember(workspaceId, { email: uniqueEmail("y"), role: "reviewer" })),
    ).toBe(200);
    expect(
      statusOf(await changeMemberRole(workspaceId, { userId: team.reviewer.id, role: "analyst" })),
    ).toBe(200);
    expect(statusOf(await removeMember(workspaceId, team.reviewer.id))).toBe(200);
    const remaining = (await listMembers(team.owner.id, workspaceId)).map(
      (member) => member.userId,
    );
    expect(remaining).not.toContain(team.reviewer.id);
  });

  it("gives 401 when signed out and 404 for someone else's workspace", async () => {
    const team = await createTeam();
    actAs(null);
    expect(
      statusOf(await inviteMember(team.workspaceId, { email: uniqueEmail("z"), role: "analyst" })),
    ).toBe(401);
    expect(statusOf(await acceptInvitationAction("whatever"))).toBe(401);
    const stranger = await createAccount("stranger");
    actAs(stranger);
    expect(
      statusOf(await inviteMember(team.workspaceId, { email: uniqueEmail("z"), role: "analyst" })),
    ).toBe(404);
    expect(statusOf(await removeMember(team.workspaceId, team.analyst.id))).toBe(404);
    expect(await listMembers(stranger.id, team.workspaceId)).toEqual([]);
  });

  it("never removes or demotes the last owner", async () => {
    const team = await createTeam();
    actAs(team.owner);
    const demote = await changeMemberRole(team.workspaceId, {
      userId: team.owner.id,
      role: "analyst",
    });
    expect(demote).toMatchObject({ ok: false, status: 409 });
    expect(await removeMember(team.workspaceId, team.owner.id)).toMatchObject({
      ok: false,
      status: 409,
    });
    await changeMemberRole(team.workspaceId, { userId: team.analyst.id, role: "owner" });
    expect(statusOf(await removeMember(team.workspaceId, team.owner.id))).toBe(200);
  });

  it("explains invalid input on the field", async () => {
    const team = await createTeam();
    actAs(team.owner);
    const result = await inviteMember(team.workspaceId, { email: "not-an-address", role: "boss" });
    expect(result).toMatchObject({ ok: false, status: 422 });
    if (!result.ok) {
      expect(result.fieldErrors.email).toMatch(/valid e-mail/);
      expect(result.fieldErrors.role).toMatch(/role/i);
    }
  });
});

describe("invitations", () => {
  it("e-mails a link that admits the invitee once, with the invited role", async () => {
    const team = await createTeam();
    const invitee = await createAccount("invitee");
    actAs(team.owner);
    expect(
      statusOf(await inviteMember(team.workspaceId, { email: invitee.email, role: "reviewer" })),
    ).toBe(200);

    const link = await invitationLinkFor(invitee.email);
    const token = new URL(link).pathname.split("/").at(-1)!;
    expect((await findInvitationByToken(token))?.state).toBe("pending");

    actAs(invitee);
    expect(await acceptInvitationAction(token)).toEqual({
      ok: true,
      data: { landing: `/w/${team.workspaceId}` },
    });
    const members = await listMembers(invitee.id, team.workspaceId);
    expect(members.find((member) => member.userId === invitee.id)?.role).toBe("reviewer");

    const reused = await acceptInvitationAction(token);
    expect(reused).toMatchObject({ ok: false, status: 410 });
    if (!reused.ok) expect(reused.message).toMatch(/already been used/);
  });

  it("lets an owner withdraw a pending invitation: the link stops working and the log says so", async () => {
    const team = await createTeam();
    const invitee = await createAccount("withdrawn");
    actAs(team.owner);
    expect(
      statusOf(await inviteMember(team.workspaceId, { email: invitee.email, role: "analyst" })),
    ).toBe(200);
    const token = new URL(await invitationLinkFor(invitee.email)).pathname.split("/").at(-1)!;
    const [pending] = await listPendingInvitations(team.workspaceId);

    for (const person of [team.analyst, team.reviewer]) {
      actAs(person);
      expect(statusOf(await withdrawInvitationAction(team.workspaceId, pending.id))).toBe(403);
    }
    const other = await createTeam();
    actAs(other.owner);
    expect(statusOf(await withdrawInvitationAction(other.workspaceId, pending.id))).toBe(404);

    actAs(team.owner);
    expect(statusOf(await withdrawInvitationAction(team.workspaceId, pending.id))).toBe(200);
    expect(statusOf(await withdrawInvitationAction(team.workspaceId, pending.id))).toBe(404);
    expect(await listPendingInvitations(team.workspaceId)).toEqual([]);
    expect((await findInvitationByToken(token))?.state).toBe("revoked");
    actAs(invitee);
    expect(await acceptInvitationAction(token)).toMatchObject({ ok: false });

    const [entry] = await listAuditEntries(team.workspaceId, {
      action: "member.invitation-withdrawn",
    });
    expect(entry).toMatchObject({
      actorId: team.owner.id,
      targetType: "invitation",
      targetId: pending.id,
      details: { email: invitee.email, role: "analyst" },
    });
  });

  it("refuses an expired link, another address, and a link replaced by a newer one", async () => {
    const team = await createTeam();
    const invitee = await createAccount("late");
    const first = await createInvitation({
      workspaceId: team.workspaceId,
      invitedBy: team.owner.id,
      email: invitee.email,
      role: "analyst",
    });
    const eightDaysLater = new Date(Date.now() + 8 * 24 * 60 * 60 * 1000);
    await expect(
      acceptInvitation({
        token: first.token,
        userId: invitee.id,
        userEmail: invitee.email,
        now: eightDaysLater,
      }),
    ).rejects.toMatchObject({ status: 410, message: expect.stringMatching(/expired/) });

    const other = await createAccount("other");
    await expect(
      acceptInvitation({ token: first.token, userId: other.id, userEmail: other.email }),
    ).rejects.toMatchObject({ status: 409 });

    const second = await createInvitation({
      workspaceId: team.workspaceId,
      invitedBy: team.owner.id,
      email: invitee.email,
      role: "analyst",
    });
    await expect(
      acceptInvitation({ token: first.token, userId: invitee.id, userEmail: invitee.email }),
    ).rejects.toMatchObject({ status: 410, message: expect.stringMatching(/newer/) });
    await expect(
      acceptInvitation({ token: second.token, userId: invitee.id, userEmail: invitee.email }),
    ).resolves.toEqual({ workspaceId: team.workspaceId });
  });

  it("does not invite someone who is already a member", async () => {
    const team = await createTeam();
    actAs(team.owner);
    const result = await inviteMember(team.workspaceId, {
      email: team.analyst.email,
      role: "reviewer",
    });
    expect(result).toMatchObject({ ok: false, status: 409 });
    if (!result.ok) expect(result.fieldErrors.email).toMatch(/already a member/);
  });
});
