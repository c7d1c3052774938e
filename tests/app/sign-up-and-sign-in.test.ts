import { randomInt } from "node:crypto";
import type { Session } from "next-auth";
import type { JWT } from "next-auth/jwt";
import { afterAll, beforeEach, describe, expect, it, vi } from "vitest";

// Server actions read the caller's address from the request; a unit test has none, so each test
// picks the address its "client" connects from.
let peer = "";
vi.mock("next/headers", () => ({
  headers: async () => new Headers({ "x-partita-peer-address": peer }),
}));

import { signUp } from "@/app/(auth)/sign-up/actions";
import { confirmSignUp } from "@/app/(auth)/sign-up/confirm/actions";
import { closeDb, db } from "@/db/client";
import { findUserByEmail } from "@/db/queries/users";
import { createAccountWithWorkspace, listWorkspacesForUser } from "@/db/queries/workspaces";
import { users } from "@/db/schema";
import { authOptions } from "@/lib/auth/options";
import { hashPassword } from "@/lib/auth/password";
import { admitSignInAttempt, signInDelaySeconds } from "@/lib/auth/rate-limit";
import { uniqueEmail } from "@/tests/support/accounts";
import { waitForMessage } from "@/tests/support/mailbox";

afterAll(closeDb);

/** A fresh documentation-range address (RFC 5737) per test, so budgets never carry over. */
const newClient = () => `198.51.100.${randomInt(1, 255)}-${randomInt(1e9)}`;
beforeEach(() => {
  peer = newClient();
});

type Authorize = (
  credentials: Record<string, string>,
  request: { headers: Record<string, string> },
) => Promise<unknown>;

/** The password check next-auth runs on POST /api/auth/callback/credentials. */
function passwordAuthorize(): Authorize {
  const provider = authOptions().providers.find((candidate) => candidate.id === "credentials");
  return (provider as unknown as { options: { authorize: Authorize } }).options.authorize;
}

/** A request as scripts/serve-app.mjs hands it on: the connection's address in its own header. */
const from = (client: string, extra: Record<string, string> = {}) => ({
  headers: { "x-partita-peer-address": client, ...extra },
});

/** Signs in as next-auth does and returns the user id, or null / the thrown message. */
async function trySignIn(email: string, password: string, client = newClient()) {
  try {
    const user = (await passwordAuthorize()({ email, password }, from(client))) as {
      id: string;
    } | null;
    return user?.id ?? null;
  } catch (error) {
    return (error as Error).message;
  }
}

/** The confirmation link's token, read from the SMTP fake's mailbox as the address owner would. */
async function confirmationToken(email: string): Promise<string> {
  const message = await waitForMessage(email, /Confirm your address/);
  const link = message.text.match(/https?:\/\/\S+\/sign-up\/confirm\?\S+/)?.[0];
  return new URL(link!).searchParams.get("token")!;
}

/** What next-auth does when someone follows an e-mailed sign-in link for an address. */
async function followEmailLink(email: string): Promise<void> {
  const user = await findUserByEmail(email);
  await authOptions().callbacks!.signIn!({
    user: user ?? { id: email, email },
    account: { provider: "email", type: "email", providerAccountId: email },
    email: { verificationRequest: false },
  } as never);
}

async function openSessionFor(userId: string, email: string): Promise<JWT> {
  return authOptions().callbacks!.jwt!({
    token: { sub: userId, email },
    user: { id: userId, email },
    account: null,
  } as never);
}

async function sessionStillWorks(token: JWT): Promise<boolean> {
  const read = await authOptions().callbacks!.jwt!({ token } as never);
  return read.sub !== undefined;
}

async function verifiedAccount(label: string, password: string) {
  const email = uniqueEmail(label);
  const { userId } = await createAccountWithWorkspace({
    name: label,
    email,
    passwordHash: await hashPassword(password),
    workspaceName: "W",
  });
  return { email, userId };
}

describe("sign-up with proof of address", () => {
  it("creates nothing until the e-mailed link is followed, then the account and its workspace", async () => {
    const email = uniqueEmail("Signup").toUpperCase();
    const result = await signUp({
      name: "Rhea",
      email,
      password: "correct horse battery",
      workspaceName: "Shards",
    });
    expect(result).toEqual({ ok: true, data: { email: email.toLowerCase() } });
    expect(await findUserByEmail(email)).toBeUndefined();
    expect(await trySignIn(email, "correct horse battery")).toMatch(/Confirm your e-mail/);

    const token = await confirmationToken(email.toLowerCase());
    const confirmed = await confirmSignUp(token);
    const user = await findUserByEmail(email);
    expect(user?.email).toBe(email.toLowerCase());
    expect(user?.emailVerified).toBeInstanceOf(Date);
    expect(user?.passwordHash).toMatch(/^\$2[aby]\$12\$/); // bcrypt's modular crypt format, cost 12
    const workspaces = await listWorkspacesForUser(user!.id);
    expect(workspaces).toEqual([{ id: expect.any(String), name: "Shards", role: "owner" }]);
    expect(
      confirmed.ok && new URL(confirmed.data.signIn, "http://x").searchParams.get("callbackUrl"),
    ).toBe(`/w/${workspaces[0].id}`);
    expect(await trySignIn(email, "correct horse battery")).toBe(user!.id);
    // The link works once.
    expect(await confirmSignUp(token)).toMatchObject({ ok: false, status: 410 });
  });

  it("explains each bad field and refuses an address that already has an account", async () => {
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
    const { email } = await verifiedAccount("dup", "long enough pass");
    const again = await signUp({
      name: "A",
      email,
      password: "long enough pass",
      workspaceName: "W",
    });
    expect(again).toMatchObject({ ok: false, status: 409 });
    if (!again.ok) expect(again.fieldErrors.email).toMatch(/already exists/);
  });

  it("sends at most three confirmation e-mails an hour to one address", async () => {
    const email = uniqueEmail("flood");
    const input = { name: "F", email, password: "long enough pass", workspaceName: "W" };
    for (let attempt = 0; attempt < 3; attempt += 1) {
      peer = newClient(); // even from different connections
      expect((await signUp(input)).ok).toBe(true);
    }
    expect(await signUp(input)).toMatchObject({ ok: false, status: 429 });
  });
});

describe("an account claimed before its owner arrives", () => {
  const INTRUDER = "intruder's password";

  it("cannot be used by the intruder, and the owner's proof leaves the intruder nothing", async () => {
    const victim = uniqueEmail("victim");
    // The intruder signs up with the victim's address; the confirmation goes to the victim.
    expect(
      (await signUp({ name: "X", email: victim, password: INTRUDER, workspaceName: "X" })).ok,
    ).toBe(true);
    expect(await trySignIn(victim, INTRUDER)).not.toMatch(/^[0-9a-f-]{36}$/);

    // The victim signs in with an e-mail link: that proves the address.
    await followEmailLink(victim);
    expect(await trySignIn(victim, INTRUDER)).toBeNull();
    // The confirmation the intruder caused no longer works either.
    expect(await confirmSignUp(await confirmationToken(victim))).toMatchObject({ status: 410 });
  });

  it("made before addresses were proven: the proof clears the intruder's password and ends their sessions", async () => {
    const victim = uniqueEmail("legacy-victim");
    // As such accounts were made before: no proven address, the intruder's password, a session.
    const [claimed] = await db()
      .insert(users)
      .values({ email: victim, name: "X", passwordHash: await hashPassword(INTRUDER) })
      .returning({ id: users.id });
    const intruderSession = await openSessionFor(claimed.id, victim);
    expect(await trySignIn(victim, INTRUDER)).toMatch(/Confirm your e-mail/);

    await followEmailLink(victim);
    expect(await trySignIn(victim, INTRUDER)).toBeNull();
    expect(await sessionStillWorks(intruderSession)).toBe(false);
  });

  it("made before addresses were proven: the owner's own confirmed sign-up replaces the intruder's password", async () => {
    const victim = uniqueEmail("legacy-signup");
    const [claimed] = await db()
      .insert(users)
      .values({ email: victim, name: "X", passwordHash: await hashPassword(INTRUDER) })
      .returning({ id: users.id });
    const intruderSession = await openSessionFor(claimed.id, victim);

    await signUp({
      name: "Vera",
      email: victim,
      password: "the owner's password",
      workspaceName: "V",
    });
    expect((await confirmSignUp(await confirmationToken(victim))).ok).toBe(true);
    expect(await trySignIn(victim, INTRUDER)).toBeNull();
    expect(await sessionStillWorks(intruderSession)).toBe(false);
    expect(await trySignIn(victim, "the owner's password")).toBe(claimed.id);
  });
});

describe("password sign-in", () => {
  it("accepts the right password and refuses wrong ones and unknown addresses alike", async () => {
    const { email, userId } = await verifiedAccount("signin", "a long password");
    expect(await trySignIn(email, "a long password")).toBe(userId);
    expect(await trySignIn(email, "wrong password")).toBeNull();
    expect(await trySignIn(uniqueEmail("ghost"), "a long password")).toBeNull();
  });

  it("slows the guessing client down and never locks the owner out", async () => {
    vi.useFakeTimers({ toFake: ["Date"] });
    const { email, userId } = await verifiedAccount("guessed", "the real password");
    const attacker = newClient();
    for (let attempt = 0; attempt < 5; attempt += 1) {
      expect(await trySignIn(email, `guess ${attempt}`, attacker)).toBeNull();
    }
    // Past five failures the attacker must wait before each further guess, even a right one…
    expect(await trySignIn(email, "guess 5", attacker)).toMatch(/Wait 1 second/);
    // …while the owner, connecting from elsewhere, signs in at once.
    expect(await trySignIn(email, "the real password", newClient())).toBe(userId);

    // The wait doubles with every further failure (progressive delay) and is capped at a minute.
    vi.advanceTimersByTime(1_000);
    expect(await trySignIn(email, "guess 6", attacker)).toBeNull();
    expect(await trySignIn(email, "guess 7", attacker)).toMatch(/Wait 2 seconds/);
    expect([5, 6, 7, 10, 11, 20].map(signInDelaySeconds)).toEqual([1, 2, 4, 32, 60, 60]);

    // Sharing the attacker's connection, the owner gets in after the delay, not hours later.
    vi.advanceTimersByTime(2_000);
    expect(await trySignIn(email, "the real password", attacker)).toBe(userId);
    vi.useRealTimers();
  });

  it("keys on the address the server sees, not on an X-Forwarded-For the client writes", async () => {
    const { email } = await verifiedAccount("spoofer", "the real password");
    const attacker = newClient();
    const authorize = passwordAuthorize();
    const guess = (attempt: number) =>
      authorize(
        { email, password: `guess ${attempt}` },
        from(attacker, { "x-forwarded-for": `203.0.113.${attempt}` }),
      ).catch((error: Error) => error.message);
    for (let attempt = 0; attempt < 5; attempt += 1) expect(await guess(attempt)).toBeNull();
    expect(await guess(5)).toMatch(/Too many sign-in attempts/);
  });

  it("gives one connection thirty attempts per quarter hour, spread over any accounts", async () => {
    const attacker = newClient();
    const accounts = Array.from({ length: 8 }, () => uniqueEmail("sprayed"));
    // The budget is counted before any password is compared, so spending it directly is the
    // same as thirty refused guesses (and spares thirty bcrypt rounds).
    for (let attempt = 0; attempt < 30; attempt += 1) {
      await admitSignInAttempt(accounts[attempt % 8], attacker);
    }
    expect(await trySignIn(accounts[0], "password1234", attacker)).toMatch(/Wait 15 minutes/);
    expect(await trySignIn(accounts[0], "password1234", newClient())).toBeNull();
  });

  it("sends at most three sign-in links per address every ten minutes", async () => {
    const email = uniqueEmail("links");
    const provider = authOptions().providers.find((candidate) => candidate.id === "email");
    const send = (
      provider as unknown as {
        options: {
          sendVerificationRequest: (input: { identifier: string; url: string }) => Promise<void>;
        };
      }
    ).options.sendVerificationRequest;
    const url = "http://127.0.0.1:3000/api/auth/callback/email?token=t";
    for (let attempt = 0; attempt < 3; attempt += 1) {
      await send({ identifier: email, url });
    }
    await expect(send({ identifier: email, url })).rejects.toThrow(/Too many sign-in links/);
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
