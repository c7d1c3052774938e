// The audit log: one entry per member event and review decision, filters, and append-only — the
// product's query module offers no edit, and PostgreSQL itself refuses UPDATE, DELETE and TRUNCATE
// (trigger in drizzle/0004_reviews_and_audit.sql).
import { sql } from "drizzle-orm";
import { afterAll, describe, expect, it, vi } from "vitest";

vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));
vi.mock("next/cache", () => ({ revalidatePath: () => undefined }));

import {
  changeMemberRole,
  inviteMember,
  removeMember,
} from "@/app/(workspace)/w/[workspaceId]/members/actions";
import { closeDb, db } from "@/db/client";
import * as auditQueries from "@/db/queries/audit";
import { listAuditActors, listAuditEntries } from "@/db/queries/audit";
import { createTeam, uniqueEmail } from "@/tests/support/accounts";
import { actAs } from "@/tests/support/fake-session";

afterAll(closeDb);

async function teamWithMemberEvents() {
  const team = await createTeam();
  const invited = uniqueEmail("invited");
  actAs(team.owner);
  expect((await inviteMember(team.workspaceId, { email: invited, role: "reviewer" })).ok).toBe(
    true,
  );
  expect(
    (await changeMemberRole(team.workspaceId, { userId: team.analyst.id, role: "owner" })).ok,
  ).toBe(true);
  expect((await removeMember(team.workspaceId, team.reviewer.id)).ok).toBe(true);
  return { ...team, invited };
}

/** The PostgreSQL error code of a failed statement (drizzle wraps the driver's error in `cause`). */
async function sqlStateOf(statement: Promise<unknown>): Promise<string | undefined> {
  try {
    await statement;
    return undefined;
  } catch (error) {
    const cause = (error as { cause?: { code?: string } }).cause;
    return cause?.code ?? (error as { code?: string }).code;
  }
}

describe("audit log", () => {
  it("records an invitation, a role change and a removal with who, whom and what", async () => {
    const team = await teamWithMemberEvents();
    const entries = await listAuditEntries(team.workspaceId);
    const byAction = Object.fromEntries(entries.map((entry) => [entry.action, entry]));
    expect(Object.keys(byAction).sort()).toEqual([
      "member.invited",
      "member.removed",
      "member.role-changed",
    ]);
    for (const entry of entries) {
      expect([entry.actorId, entry.actorEmail]).toEqual([team.owner.id, team.owner.email]);
    }
    expect(byAction["member.invited"].details).toEqual({ email: team.invited, role: "reviewer" });
    expect(byAction["member.role-changed"]).toMatchObject({
      targetType: "member",
      targetId: team.analyst.id,
      details: { email: team.analyst.email, from: "analyst", to: "owner" },
    });
    expect(byAction["member.removed"]).toMatchObject({
      targetId: team.reviewer.id,
      details: { email: team.reviewer.email, role: "reviewer" },
    });
  });

  it("writes nothing when the action was refused", async () => {
    const team = await createTeam();
    actAs(team.analyst);
    // Inviting needs an owner (lib/auth/roles.ts): 403.
    expect(
      await inviteMember(team.workspaceId, { email: uniqueEmail("no"), role: "analyst" }),
    ).toMatchObject({ ok: false, status: 403 });
    actAs(team.owner);
    // The last owner cannot be demoted (a product rule), so there is no role change to record.
    expect(
      await changeMemberRole(team.workspaceId, { userId: team.owner.id, role: "analyst" }),
    ).toMatchObject({ ok: false });
    expect(await listAuditEntries(team.workspaceId)).toEqual([]);
    // The same workspace does record an action that is allowed, so the empty log above is the
    // refusals' doing.
    expect(
      (await changeMemberRole(team.workspaceId, { userId: team.analyst.id, role: "reviewer" })).ok,
    ).toBe(true);
    expect((await listAuditEntries(team.workspaceId)).map((entry) => entry.action)).toEqual([
      "member.role-changed",
    ]);
  });

  it("filters by action, actor and UTC day, and never shows another workspace's entries", async () => {
    const team = await teamWithMemberEvents();
    const other = await teamWithMemberEvents();
    const removals = await listAuditEntries(team.workspaceId, { action: "member.removed" });
    expect(removals.map((entry) => entry.targetId)).toEqual([team.reviewer.id]);
    expect(await listAuditEntries(team.workspaceId, { actor: other.owner.id })).toEqual([]);
    expect(await listAuditActors(team.workspaceId)).toEqual([
      { id: team.owner.id, email: team.owner.email },
    ]);
    // The UTC days the entries were written on, from the entries themselves rather than from the
    // clock now (which near midnight may already show the next day).
    const days = (await listAuditEntries(team.workspaceId))
      .map((entry) => entry.createdAt.toISOString().slice(0, 10))
      .sort();
    const [first, last] = [days[0], days[days.length - 1]];
    expect(await listAuditEntries(team.workspaceId, { from: first, to: last })).toHaveLength(3);
    const dayBefore = new Date(Date.parse(`${first}T00:00:00Z`) - 86_400_000)
      .toISOString()
      .slice(0, 10);
    expect(await listAuditEntries(team.workspaceId, { to: dayBefore })).toEqual([]);
    expect(await listAuditEntries(team.workspaceId, { to: "2000-01-01" })).toEqual([]);
  });

  it("offers no way to edit or delete entries, and PostgreSQL refuses to", async () => {
    // The query module is the product's only path to the table: it appends and reads.
    expect(Object.keys(auditQueries).sort()).toEqual([
      "listAuditActors",
      "listAuditEntries",
      "recordAudit",
    ]);
    const team = await teamWithMemberEvents();
    const id = (await listAuditEntries(team.workspaceId))[0].id;
    // 42501 = insufficient_privilege, the code the trigger raises.
    expect(
      await sqlStateOf(db().execute(sql`update audit_log set action = 'x' where id = ${id}`)),
    ).toBe("42501");
    expect(await sqlStateOf(db().execute(sql`delete from audit_log where id = ${id}`))).toBe(
      "42501",
    );
    expect(await sqlStateOf(db().execute(sql`truncate audit_log`))).toBe("42501");
    expect(await listAuditEntries(team.workspaceId)).toHaveLength(3);
  });
});
