// The token lifecycle end to end against PostgreSQL: create on the tokens page's action, use on the
// API's guard, expire, revoke, lose membership. The stored hash is checked with Node's own SHA-256
// (FIPS 180-4) over the token the page showed, and the token text must appear nowhere in the row.
import { createHash } from "node:crypto";
import { eq } from "drizzle-orm";
import { afterAll, describe, expect, it, vi } from "vitest";

vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));
vi.mock("next/cache", () => ({ revalidatePath: vi.fn() }));

import {
  createApiToken,
  revokeApiTokenAction,
} from "@/app/(workspace)/w/[workspaceId]/tokens/actions";
import { GET as getCaller } from "@/app/api/v1/workspace/route";
import { closeDb, db } from "@/db/client";
import { listApiTokens, listOthersApiTokens } from "@/db/queries/api-tokens";
import { listAuditEntries } from "@/db/queries/audit";
import { requireToken } from "@/lib/auth/api-token-guard";
import { apiTokens, memberships } from "@/db/schema";
import { createAccount, createTeam } from "@/tests/support/accounts";
import { apiRequest } from "@/tests/support/api-tokens";
import { actAs } from "@/tests/support/fake-session";

afterAll(closeDb);

async function errorCodeOf(response: Response): Promise<string> {
  return ((await response.json()) as { error: { code: string } }).error.code;
}

async function createTokenAs(user: Parameters<typeof actAs>[0], workspaceId: string) {
  actAs(user);
  const result = await createApiToken(workspaceId, {
    name: "nightly shard check",
    lifetimeDays: 30,
  });
  if (!result.ok) throw new Error(result.message);
  return result.data;
}

describe("personal API tokens", () => {
  it("are created by owners and analysts only, shown once and stored as a SHA-256 hash", async () => {
    const team = await createTeam();
    actAs(team.reviewer);
    const refused = await createApiToken(team.workspaceId, { name: "x", lifetimeDays: 30 });
    expect(refused).toMatchObject({ ok: false, status: 403 });

    // The clock is frozen (Date only: timers and the database keep running), so the expiry is
    // exactly 30 × 86 400 000 ms after it.
    const now = new Date("2026-03-01T12:00:00.000Z");
    vi.useFakeTimers({ toFake: ["Date"], now });
    let created: Awaited<ReturnType<typeof createTokenAs>>;
    try {
      created = await createTokenAs(team.analyst, team.workspaceId);
    } finally {
      vi.useRealTimers();
    }
    await createTokenAs(team.owner, team.workspaceId);
    expect(created.token).toMatch(/^prtk_[A-Za-z0-9_-]{43}$/);
    expect(created.expiresAt.toISOString()).toBe("2026-03-31T12:00:00.000Z");

    const rows = await db().select().from(apiTokens).where(eq(apiTokens.userId, team.analyst.id));
    expect(rows).toHaveLength(1);
    expect(rows[0].tokenHash).toBe(createHash("sha256").update(created.token).digest("hex"));
    expect(JSON.stringify(rows[0])).not.toContain(created.token.slice(5));

    // What the page lists: the analyst's own token, never its hash or text.
    const listed = await listApiTokens(team.workspaceId, team.analyst.id);
    expect(listed.map((token) => token.name)).toEqual(["nightly shard check"]);
    expect(JSON.stringify(listed)).not.toContain(rows[0].tokenHash);
    expect(Object.keys(listed[0]).sort()).toEqual(
      ["createdAt", "expiresAt", "id", "lastUsedAt", "name", "revokedAt"].sort(),
    );
  });

  it("refuses a bad name or lifetime with field errors", async () => {
    const team = await createTeam();
    actAs(team.analyst);
    const result = await createApiToken(team.workspaceId, { name: " ", lifetimeDays: 12 });
    expect(result.ok).toBe(false);
    if (result.ok) return;
    expect(result.status).toBe(422);
    expect(Object.keys(result.fieldErrors).sort()).toEqual(["lifetimeDays", "name"]);
  });

  it("work until revoked, recording their last use", async () => {
    const team = await createTeam();
    const { token } = await createTokenAs(team.analyst, team.workspaceId);
    const [before] = await listApiTokens(team.workspaceId, team.analyst.id);
    expect(before.lastUsedAt).toBeNull();

    const response = await getCaller(apiRequest("/api/v1/workspace", token));
    expect(response.status).toBe(200);
    expect(await response.json()).toMatchObject({
      workspace: { id: team.workspaceId },
      role: "analyst",
      user: { id: team.analyst.id },
      token: { name: "nightly shard check" },
    });
    const [after] = await listApiTokens(team.workspaceId, team.analyst.id);
    expect(after.lastUsedAt).not.toBeNull();

    // The last use is kept to the minute: within it, a request writes nothing.
    const used = after.lastUsedAt!.getTime();
    await requireToken(
      apiRequest("/api/v1/workspace", token),
      "readWorkspace",
      new Date(used + 30_000),
    );
    const [sameMinute] = await listApiTokens(team.workspaceId, team.analyst.id);
    expect(sameMinute.lastUsedAt?.getTime()).toBe(used);
    await requireToken(
      apiRequest("/api/v1/workspace", token),
      "readWorkspace",
      new Date(used + 61_000),
    );
    const [nextMinute] = await listApiTokens(team.workspaceId, team.analyst.id);
    expect(nextMinute.lastUsedAt?.getTime()).toBe(used + 61_000);

    // Another analyst cannot revoke it (nor learn that it exists); its holder can, once.
    const otherAnalyst = await createAccount("other-analyst");
    await db()
      .insert(memberships)
      .values({ workspaceId: team.workspaceId, userId: otherAnalyst.id, role: "analyst" });
    actAs(otherAnalyst);
    expect(await revokeApiTokenAction(team.workspaceId, before.id)).toMatchObject({
      ok: false,
      status: 404,
    });
    actAs(team.analyst);
    expect((await revokeApiTokenAction(team.workspaceId, before.id)).ok).toBe(true);
    expect((await revokeApiTokenAction(team.workspaceId, before.id)).ok).toBe(false);

    // Issue 5: owners read in the audit log who created and revoked a token (never the token).
    const entries = await listAuditEntries(team.workspaceId);
    expect(entries.map((entry) => [entry.action, entry.actorId, entry.targetId]).sort()).toEqual([
      ["api-token.created", team.analyst.id, before.id],
      ["api-token.revoked", team.analyst.id, before.id],
    ]);
    expect(JSON.stringify(entries)).not.toContain(token);

    const revoked = await getCaller(apiRequest("/api/v1/workspace", token));
    expect(revoked.status).toBe(401);
    expect(revoked.headers.get("www-authenticate")).toMatch(/^Bearer/);
    expect(await errorCodeOf(revoked)).toBe("token_revoked");
  });

  it("can be listed and revoked by an owner, never shown, with the revocation in the log", async () => {
    const team = await createTeam();
    const { token } = await createTokenAs(team.analyst, team.workspaceId);
    const [listed] = await listOthersApiTokens(team.workspaceId, team.owner.id);
    expect(listed).toMatchObject({ name: "nightly shard check", holderEmail: team.analyst.email });
    expect(JSON.stringify(listed)).not.toContain(token.slice(5));
    // The analyst sees no one else's tokens through this query's page: it is an owner's view.
    expect(await listOthersApiTokens(team.workspaceId, team.analyst.id)).toEqual([]);

    actAs(team.owner);
    expect((await revokeApiTokenAction(team.workspaceId, listed.id)).ok).toBe(true);
    expect((await getCaller(apiRequest("/api/v1/workspace", token))).status).toBe(401);
    const [revocation] = await listAuditEntries(team.workspaceId, {
      action: "api-token.revoked",
    });
    expect(revocation).toMatchObject({
      actorId: team.owner.id,
      targetId: listed.id,
      details: { name: "nightly shard check", owner: team.analyst.email },
    });

    // An owner's power stops at the workspace's edge.
    const other = await createTeam();
    const { token: otherToken } = await createTokenAs(other.analyst, other.workspaceId);
    const [otherListed] = await listOthersApiTokens(other.workspaceId, other.owner.id);
    actAs(team.owner);
    expect(await revokeApiTokenAction(team.workspaceId, otherListed.id)).toMatchObject({
      ok: false,
      status: 404,
    });
    expect((await getCaller(apiRequest("/api/v1/workspace", otherToken))).status).toBe(200);
  });

  it("stop working when they expire", async () => {
    const team = await createTeam();
    const { token } = await createTokenAs(team.owner, team.workspaceId);
    await db()
      .update(apiTokens)
      .set({ expiresAt: new Date(Date.now() - 1000) })
      .where(eq(apiTokens.userId, team.owner.id));
    const response = await getCaller(apiRequest("/api/v1/workspace", token));
    expect(response.status).toBe(401);
    expect(await errorCodeOf(response)).toBe("token_expired");
  });

  it("act with the user's current role, and not at all once they leave", async () => {
    const team = await createTeam();
    const { token } = await createTokenAs(team.analyst, team.workspaceId);
    const membership = eq(memberships.userId, team.analyst.id);

    await db().update(memberships).set({ role: "reviewer" }).where(membership);
    const demoted = await getCaller(apiRequest("/api/v1/workspace", token));
    expect(((await demoted.json()) as { role: string }).role).toBe("reviewer");

    await db().delete(memberships).where(membership);
    const removed = await getCaller(apiRequest("/api/v1/workspace", token));
    expect(removed.status).toBe(401);
    expect(await errorCodeOf(removed)).toBe("token_no_access");
  });

  it("refuse missing, malformed and unknown tokens with 401", async () => {
    const missing = await getCaller(apiRequest("/api/v1/workspace", undefined));
    expect([missing.status, await errorCodeOf(missing)]).toEqual([401, "missing_token"]);
    const malformed = await getCaller(apiRequest("/api/v1/workspace", "not-a-token"));
    expect([malformed.status, await errorCodeOf(malformed)]).toEqual([401, "invalid_token"]);
    const unknown = await getCaller(apiRequest("/api/v1/workspace", `prtk_${"A".repeat(43)}`));
    expect([unknown.status, await errorCodeOf(unknown)]).toEqual([401, "invalid_token"]);
  });
});
