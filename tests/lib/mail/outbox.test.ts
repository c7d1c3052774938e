// Mail goes out through the outbox: an action that e-mails (an invitation, a sign-up's proof of
// address) returns while the SMTP server is down, and the message arrives once it is back, exactly
// once. The sender here is the loop the worker
// runs (runMailSender), on a database of this test's own, so the test services' worker cannot
// deliver the message first; the SMTP server is the project's fake, stopped and started again.
import { mkdtempSync, rmSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";

const databaseUrl = vi.hoisted(() => {
  const original = process.env.DATABASE_URL ?? "";
  const url = new URL(original);
  url.pathname = `/partita_outbox_${crypto.randomUUID().replaceAll("-", "").slice(0, 12)}`;
  process.env.DATABASE_URL = url.toString();
  return { original, private: url.toString() };
});
vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));
vi.mock("next/cache", () => ({ revalidatePath: () => undefined }));
// Sign-up reads the caller's address from the request; a documentation-range one (RFC 5737).
vi.mock("next/headers", () => ({
  headers: async () => new Headers({ "x-partita-peer-address": "192.0.2.10" }),
}));

import { signUp } from "@/app/(auth)/sign-up/actions";
import { inviteMember } from "@/app/(workspace)/w/[workspaceId]/members/actions";
import { closeDb, db } from "@/db/client";
import { findUserByEmail } from "@/db/queries/users";
import { mailOutbox } from "@/db/schema";
import { startFakeSmtp, type RunningFakeSmtp } from "@/fakes/smtp";
import { runMailSender } from "@/lib/mail";
import { findMessagesTo } from "@/lib/mail/dev-inbox";
import { findFreePort } from "@/scripts/services/ports";
import { createTeam, uniqueEmail } from "@/tests/support/accounts";
import { actAs } from "@/tests/support/fake-session";
import { createMigratedDatabase, dropDatabase } from "@/tests/support/private-database";

const savedEnvironment = { ...process.env };
let mailDirectory: string;
let smtpPort: number;
let smtp: RunningFakeSmtp | undefined;
const senderStopped = new AbortController();
let sender: Promise<void> | undefined;
const senderLog: string[] = [];
const logWaiters: { pattern: RegExp; resolve(): void }[] = [];

/** Resolves when the sender logs a line matching `pattern` from now on. */
function nextSenderLog(pattern: RegExp): Promise<void> {
  return new Promise((resolve) => logWaiters.push({ pattern, resolve }));
}

/** Resolves when the sender logs a line matching `pattern` (now or later). */
function senderLogs(pattern: RegExp): Promise<void> {
  if (senderLog.some((line) => pattern.test(line))) return Promise.resolve();
  return nextSenderLog(pattern);
}

async function waitForMailTo(address: string) {
  for (;;) {
    const messages = await findMessagesTo(address);
    if (messages.length > 0) return messages;
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
}

beforeAll(async () => {
  await createMigratedDatabase(databaseUrl.private);
  mailDirectory = mkdtempSync(path.join(os.tmpdir(), "partita-outbox-mail-"));
  smtpPort = await findFreePort();
  Object.assign(process.env, {
    SMTP_HOST: "127.0.0.1",
    SMTP_PORT: String(smtpPort),
    DEV_MAIL_DIR: mailDirectory,
    MAIL_TIMEOUT_MS: "1000",
  });
  smtp = await startFakeSmtp({ port: smtpPort, directory: mailDirectory });
  sender = runMailSender({
    pollMs: 100,
    firstRetrySeconds: 0.2,
    signal: senderStopped.signal,
    log: (line) => {
      senderLog.push(line);
      for (const waiter of logWaiters) if (waiter.pattern.test(line)) waiter.resolve();
    },
  });
});

afterAll(async () => {
  senderStopped.abort();
  await sender;
  await smtp?.stop();
  await closeDb();
  await dropDatabase(databaseUrl.private);
  rmSync(mailDirectory, { recursive: true, force: true });
  process.env = savedEnvironment;
  process.env.DATABASE_URL = databaseUrl.original;
});

describe("the mail outbox", () => {
  it("lets an action finish while SMTP is down and delivers once SMTP is back", async () => {
    await smtp?.stop();
    smtp = undefined;

    const team = await createTeam();
    actAs(team.owner);
    const invited = uniqueEmail("invitee");
    // Before the outbox, the action sent over SMTP itself and failed while the server was down.
    const result = await inviteMember(team.workspaceId, { email: invited, role: "reviewer" });
    expect(result.ok).toBe(true);

    // The sender tried, failed, and kept the message.
    await senderLogs(/not sent/);
    const [queued] = await db().select().from(mailOutbox).where(eq(mailOutbox.recipients, invited));
    expect(queued).toMatchObject({ recipients: invited, sentAt: null });
    expect(queued.attempts).toBeGreaterThan(0);
    expect(await findMessagesTo(invited)).toEqual([]);

    smtp = await startFakeSmtp({ port: smtpPort, directory: mailDirectory });
    const [message, ...others] = await waitForMailTo(invited);
    expect(others).toEqual([]);
    expect(message.subject).toMatch(/invit/i);
    const [sent] = await db().select().from(mailOutbox).where(eq(mailOutbox.id, queued.id));
    expect(sent.sentAt).toBeInstanceOf(Date);
  });

  it("lets a sign-up finish while SMTP is down and delivers its proof of address once it is back", async () => {
    await smtp?.stop();
    smtp = undefined;
    const email = uniqueEmail("newcomer");
    // The only message due is this one (the invitation went out), so this failure is its.
    const failedOnce = nextSenderLog(/not sent/);
    // Before the sign-up mail went through the outbox, this failed with SMTP down.
    const result = await signUp({
      name: "Newcomer",
      email,
      password: "correct horse battery",
      workspaceName: "Shards",
    });
    expect(result).toEqual({ ok: true, data: { email } });

    await failedOnce;
    const [queued] = await db().select().from(mailOutbox).where(eq(mailOutbox.recipients, email));
    expect(queued).toMatchObject({ sentAt: null });
    expect(await findMessagesTo(email)).toEqual([]);

    smtp = await startFakeSmtp({ port: smtpPort, directory: mailDirectory });
    const [message, ...others] = await waitForMailTo(email);
    expect(others).toEqual([]);
    expect(message.subject).toMatch(/Confirm your address/);
    expect(message.text).toMatch(/\/sign-up\/confirm\?token=/);
    // Still nothing but the pending sign-up until the link is followed.
    expect(await findUserByEmail(email)).toBeUndefined();
  });
});
