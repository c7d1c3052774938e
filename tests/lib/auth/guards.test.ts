import { afterAll, describe, expect, it, vi } from "vitest";

vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));

import { closeDb } from "@/db/client";
import { requireRole, requireUser } from "@/lib/auth/guards";
import { AccessError } from "@/lib/auth/errors";
import { CAPABILITIES, ROLES, type Capability } from "@/lib/auth/roles";
import { createAccount, createTeam } from "@/tests/support/accounts";
import { actAs } from "@/tests/support/fake-session";

afterAll(closeDb);

async function statusOf(promise: Promise<unknown>): Promise<number> {
  try {
    await promise;
    return 200;
  } catch (error) {
    if (error instanceof AccessError) return error.status;
    throw error;
  }
}

// The expected matrix is written out by hand from product.md ("owner: members, settings; analyst:
// upload, analyse; reviewer: read, comment, approve"), not derived from CAPABILITIES, so a wrong
// edit to the capability table fails here.
const EXPECTED: Record<Capability, Record<(typeof ROLES)[number], number>> = {
  readWorkspace: { owner: 200, analyst: 200, reviewer: 200 },
  manageMembers: { owner: 200, analyst: 403, reviewer: 403 },
  uploadData: { owner: 200, analyst: 200, reviewer: 403 },
  runAnalysis: { owner: 200, analyst: 200, reviewer: 403 },
  // Issue 5: "Personal API tokens (owners and analysts)".
  manageApiTokens: { owner: 200, analyst: 200, reviewer: 403 },
  // Common practice: an administrator can stop anyone's credential in their organisation.
  revokeAnyApiToken: { owner: 200, analyst: 403, reviewer: 403 },
  // Issue 5: "An analyst requests a review … Reviewers comment … and decide"; owners read the log.
  requestReview: { owner: 200, analyst: 200, reviewer: 403 },
  commentOnReport: { owner: 200, analyst: 200, reviewer: 200 },
  decideReview: { owner: 200, analyst: 403, reviewer: 200 },
  readAuditLog: { owner: 200, analyst: 403, reviewer: 403 },
  // Issue 5 puts deletions in the owners' audit log; deleting takes others' reviews with it.
  deleteReport: { owner: 200, analyst: 403, reviewer: 403 },
};

describe("guards", () => {
  it("refuses a signed-out caller with 401", async () => {
    actAs(null);
    expect(await statusOf(requireUser())).toBe(401);
    expect(await statusOf(requireRole("any-workspace", "readWorkspace"))).toBe(401);
  });

  it("covers every capability in the expected matrix", () => {
    expect(Object.keys(EXPECTED).sort()).toEqual(Object.keys(CAPABILITIES).sort());
  });

  it("lets each role do exactly what the matrix says", async () => {
    const team = await createTeam();
    for (const role of ROLES) {
      actAs(team[role]);
      for (const capability of Object.keys(EXPECTED) as Capability[]) {
        const status = await statusOf(requireRole(team.workspaceId, capability));
        expect({ role, capability, status }).toEqual({
          role,
          capability,
          status: EXPECTED[capability][role],
        });
      }
    }
  });

  it("hides another workspace behind 404, whatever the caller's role elsewhere", async () => {
    const team = await createTeam();
    const stranger = await createAccount("stranger");
    actAs(stranger);
    for (const capability of Object.keys(EXPECTED) as Capability[]) {
      expect(await statusOf(requireRole(team.workspaceId, capability))).toBe(404);
    }
    actAs(team.owner);
    expect(await statusOf(requireRole(stranger.workspaceId, "readWorkspace"))).toBe(404);
  });
});
