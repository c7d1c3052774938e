// Sends through nodemailer to the SMTP fake that scripts/test.ts starts (SMTP_PORT, DEV_MAIL_DIR)
// and reads the result back the way the development inbox does.
import { randomUUID } from "node:crypto";
import { describe, expect, it } from "vitest";
import { mailTransport, sendMail } from "@/lib/mail";
import { findMessagesTo, listMessages, readMessage } from "@/lib/mail/dev-inbox";

const uniqueAddress = (label: string) => `${label}-${randomUUID().slice(0, 8)}@mail-test.local`;

describe("lib/mail through the SMTP fake", () => {
  it("delivers a message that the dev inbox finds by recipient", async () => {
    const to = uniqueAddress("reviewer");
    const link = `http://127.0.0.1:3000/invite/${randomUUID()}`;
    await sendMail({ to, subject: "Referred to you", text: `Open the report: ${link}` });

    const [message, ...others] = await findMessagesTo(to.toUpperCase());
    expect(others).toHaveLength(0);
    expect(message.subject).toBe("Referred to you");
    expect(message.to).toEqual([to]);
    expect(message.from).toContain("no-reply@partita.local");
    expect(message.text).toContain(link);
    expect(Math.abs(message.receivedAt.getTime() - Date.now())).toBeLessThan(60_000);
  });

  it("lists newest first and reads one message by id", async () => {
    const to = uniqueAddress("analyst");
    await sendMail({ to, subject: "first", text: "one" });
    await sendMail({ to, subject: "second", text: "two", html: "<p>two</p>" });

    const subjects = (await findMessagesTo(to)).map((message) => message.subject);
    expect(subjects).toEqual(["second", "first"]);
    const listed = (await listMessages()).filter((message) => message.to.includes(to));
    expect(listed.map((message) => message.subject)).toEqual(["second", "first"]);
    const read = await readMessage(listed[0].id);
    expect(read?.text.trim()).toBe("two");
  });

  it("finds a Bcc recipient, who appears only in the SMTP envelope", async () => {
    const hidden = uniqueAddress("auditor");
    const visible = uniqueAddress("owner");
    await mailTransport().sendMail({
      from: "Partita <no-reply@partita.local>",
      to: visible,
      bcc: hidden,
      subject: "Endorsed",
      text: "The layout was endorsed.",
    });
    const [message] = await findMessagesTo(hidden);
    expect(message?.subject).toBe("Endorsed");
  });

  it("rejects message ids that could leave the mail folder", async () => {
    expect(await readMessage("../secret")).toBeUndefined();
    expect(await readMessage("no-such-message")).toBeUndefined();
  });
});
