import type { JWT } from "next-auth/jwt";
import { afterAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import { isSessionLive } from "@/db/queries/sessions";
import { updateMembership } from "@/db/queries/members";
import { authOptions, SESSION_MAX_AGE_SECONDS } from "@/lib/auth/options";
import { createAccount, createTeam } from "@/tests/support/accounts";

afterAll(closeDb);

type Person = { id: string; email: string; name: string | null };

/** What next-auth does on a successful sign-in: the jwt callback with the signed-in user. */
async function signIn(person: Person): Promise<JWT> {
  const jwt = authOptions().callbacks!.jwt!;
  return jwt({
    token: { sub: person.id, email: person.email, name: person.name },
    user: { id: person.id, email: person.email, name: person.name },
    account: null,
  } as never);
}

/** What next-auth does on every later request with the cookie: the jwt callback alone. */
async function readCookie(token: JWT): Promise<string | undefined> {
  const jwt = authOptions().callbacks!.jwt!;
  const read = await jwt({ token } as never);
  return read.sub;
}

async function signOut(token: JWT): Promise<void> {
  await authOptions().events!.signOut!({ token, session: undefined as never });
}

describe("sessions end on the server", () => {
  it("sign-out ends that browser's session at once and leaves the person's other browsers", async () => {
    const person = await createAccount("signout");
    const laptop = await signIn(person);
    const phone = await signIn(person);
    expect(await readCookie(laptop)).toBe(person.id);

    await signOut(laptop);
    expect(await readCookie(laptop)).toBeUndefined();
    expect(await readCookie(phone)).toBe(person.id);
  });

  it("removal from a workspace ends every session of the removed person", async () => {
    const { workspaceId, owner, analyst } = await createTeam();
    const analystCookie = await signIn(analyst);
    const ownerCookie = await signIn(owner);

    await updateMembership(workspaceId, analyst.id, null);
    expect(await readCookie(analystCookie)).toBeUndefined();
    expect(await readCookie(ownerCookie)).toBe(owner.id);
  });

  it("a cookie from before server-side sessions (no session id) signs nobody in", async () => {
    const person = await createAccount("legacy");
    expect(await readCookie({ sub: person.id, email: person.email })).toBeUndefined();
  });

  it("lasts twelve hours from sign-in", async () => {
    expect(SESSION_MAX_AGE_SECONDS).toBe(12 * 60 * 60);
    const person = await createAccount("expiry");
    const token = await signIn(person);
    const sid = token.sid as string;
    const hours = (count: number) => new Date(Date.now() + count * 60 * 60 * 1000);
    expect(await isSessionLive(sid, person.id, hours(11.9))).toBe(true);
    expect(await isSessionLive(sid, person.id, hours(12.1))).toBe(false);
  });
});
