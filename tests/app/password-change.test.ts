import type { JWT } from "next-auth/jwt";
import { afterAll, describe, expect, it, vi } from "vitest";

vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));
vi.mock("next/headers", () => ({
  headers: async () => new Headers({ "x-partita-peer-address": "198.51.100.77" }),
}));

import { changePassword } from "@/app/(workspace)/w/[workspaceId]/settings/password/actions";
import { closeDb } from "@/db/client";
import { findUserById } from "@/db/queries/users";
import { createAccountWithWorkspace } from "@/db/queries/workspaces";
import { authOptions } from "@/lib/auth/options";
import { hashPassword, verifyPassword } from "@/lib/auth/password";
import { uniqueEmail } from "@/tests/support/accounts";
import { actAs } from "@/tests/support/fake-session";

afterAll(closeDb);

async function personWithPassword(password: string) {
  const email = uniqueEmail("changer");
  const { userId } = await createAccountWithWorkspace({
    name: "Changer",
    email,
    passwordHash: await hashPassword(password),
    workspaceName: "W",
  });
  return { id: userId, email, name: "Changer" };
}

async function openSession(person: { id: string; email: string }): Promise<JWT> {
  return authOptions().callbacks!.jwt!({
    token: { sub: person.id, email: person.email },
    user: person,
    account: null,
  } as never);
}

async function stillSignedIn(token: JWT): Promise<boolean> {
  return (await authOptions().callbacks!.jwt!({ token } as never)).sub !== undefined;
}

describe("changing the password", () => {
  it("needs the current password and leaves everything as it was when it is wrong", async () => {
    const person = await personWithPassword("the old password");
    const session = await openSession(person);
    actAs(person);
    const result = await changePassword({
      currentPassword: "a wrong guess",
      newPassword: "the new password",
    });
    expect(result).toMatchObject({ ok: false, status: 422 });
    if (!result.ok) expect(result.fieldErrors.currentPassword).toMatch(/not your current/);
    expect(await stillSignedIn(session)).toBe(true);
  });

  it("sets the new password and ends every session of the person, here and elsewhere", async () => {
    const person = await personWithPassword("the old password");
    const here = await openSession(person);
    const elsewhere = await openSession(person);
    actAs(person);
    const result = await changePassword({
      currentPassword: "the old password",
      newPassword: "the new password",
    });
    expect(result.ok).toBe(true);
    expect(await stillSignedIn(here)).toBe(false);
    expect(await stillSignedIn(elsewhere)).toBe(false);
    const hash = (await findUserById(person.id))!.passwordHash!;
    expect(await verifyPassword("the new password", hash)).toBe(true);
  });
});
