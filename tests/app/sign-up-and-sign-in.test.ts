import type { Session } from "next-auth";
import { afterAll, describe, expect, it } from "vitest";
import { signUp } from "@/app/(auth)/sign-up/actions";
import { closeDb } from "@/db/client";
import { findUserByEmail } from "@/db/queries/users";
import { listWorkspacesForUser } from "@/db/queries/workspaces";
import { authOptions } from "@/lib/auth/options";
import { uniqueEmail } from "@/tests/support/accounts";

afterAll(closeDb);

type Authorize = (
  credentials: Record<string, string>,
  request: { headers: Record<string, string> },
) => Promise<unknown>;

/** The password check next-auth runs on POST /api/auth/callback/credentials. */
function passwordAuthorize(): Authorize {
  const provider = authOptions().providers.find((candidate) => candidate.id === "credentials");
  return (provider as unknown as { options: { authorize: Authorize } }).options.authorize;
}

const request = (client: string) => ({ headers: { "x-forwarded-for": client } });

describe("sign-up", () => {
  it("creates the account, hashes the password and makes the person owner of a new workspace", async () => {
    const email = uniqueEmail("Signup").toUpperCase();
    const result = await signUp({
      name: "Rhea",
      email,
      password: "correct horse battery",
      workspaceName: "Shards",
    });
    expect(result.ok).toBe(true);
    const user = await findUserByEmail(email);
    expect(user?.email).toBe(email.toLowerCase());
    expect(user?.passwordHash).toMatch(/^\$2[aby]\$12\$/); // bcrypt's modular crypt format, cost 12
    const workspaces = await listWorkspacesForUser(user!.id);
    expect(workspaces).toEqual([{ id: expect.any(String), name: "Shards", role: "owner" }]);
    if (result.ok) expect(result.data.landing).toBe(`/w/${workspaces[0].id}`);
  });

  it("explains each bad field and refuses a duplicate account", async () => {
    const bad = await signUp({ name: "", email: "nobody@", password: "short", workspaceName: "" });
    expect(bad).toMatchObject({ ok: false, status: 422 });
    if (!bad.ok) {
      expect(bad.fieldErrors).toMatchObject({
        name: expect.stringMatching(/name/),
        email: expect.stringMatching(/valid e-mail/),
        password: expect.stringMatching(/at least 10/),
        workspaceName: expect.stringMatching(/workspace/),
      });
    }
    const email = uniqueEmail("dup");
    const input = { name: "A", email, password: "long enough pass", workspaceName: "W" };
    expect((await signUp(input)).ok).toBe(true);
    const again = await signUp(input);
    expect(again).toMatchObject({ ok: false, status: 409 });
    if (!again.ok) expect(again.fieldErrors.email).toMatch(/already exists/);
  });
});

describe("password sign-in", () => {
  it("accepts the right password and refuses wrong ones and unknown addresses alike", async () => {
    const email = uniqueEmail("signin");
    await signUp({ name: "Ines", email, password: "a long password", workspaceName: "W" });
    const authorize = passwordAuthorize();
    const user = await findUserByEmail(email);
    await expect(
      authorize({ email, password: "a long password" }, request("10.0.0.1")),
    ).resolves.toEqual({
      id: user!.id,
      name: "Ines",
      email,
    });
    await expect(
      authorize({ email, password: "wrong password" }, request("10.0.0.1")),
    ).resolves.toBeNull();
    await expect(
      authorize({ email: uniqueEmail("ghost"), password: "a long password" }, request("10.0.0.1")),
    ).resolves.toBeNull();
  });

  it("stops guessing after five failures for one account", async () => {
    const email = uniqueEmail("guessed");
    await signUp({ name: "G", email, password: "the real password", workspaceName: "W" });
    const authorize = passwordAuthorize();
    for (let attempt = 0; attempt < 5; attempt += 1) {
      await expect(
        authorize({ email, password: `guess ${attempt}` }, request("10.0.0.2")),
      ).resolves.toBeNull();
    }
    // Even the right password is refused while the account is locked out.
    await expect(
      authorize({ email, password: "the real password" }, request("10.0.0.2")),
    ).rejects.toThrow(/Too many sign-in attempts. Wait 15 minutes/);
  });

  it("puts the user id into the session", async () => {
    const session = authOptions().callbacks!.session!;
    const result = await session({
      session: { user: { id: "", email: "a@b.c" }, expires: "" },
      token: { sub: "user-42" },
    } as never);
    expect((result as Session).user.id).toBe("user-42");
  });
});
