import { randomUUID } from "node:crypto";
import { afterEach, describe, expect, it } from "vitest";
import { sendMail } from "@/lib/mail";
import { baseUrl, openBrowser, type BrowserSession } from "./support/browser";

describe("the running app", () => {
  let session: BrowserSession | undefined;
  afterEach(async () => {
    await session?.close();
    session = undefined;
  });

  it("serves a page titled Partita", async () => {
    session = await openBrowser();
    const response = await session.page.goto("/");
    expect(response?.ok()).toBe(true);
    expect(await session.page.title()).toContain("Partita");
  });

  it("shows caught mail in the development inbox, with clickable links", async () => {
    const to = `inbox-${randomUUID().slice(0, 8)}@e2e.partita.local`;
    const subject = `Inbox check ${randomUUID().slice(0, 8)}`;
    const link = `${baseUrl()}/sign-in`;
    await sendMail({ to, subject, text: `Continue here: ${link}\nThanks.` });

    session = await openBrowser();
    const { page } = session;
    await page.goto("/dev/inbox");
    const banner = page.getByText("only present while the local mail fake is in use");
    expect(await banner.count()).toBe(1);
    await page.getByRole("link", { name: new RegExp(subject) }).click();
    await page.getByRole("heading", { name: subject }).waitFor();
    expect(await page.getByText(to).count()).toBeGreaterThan(0);
    await page.getByRole("link", { name: link }).click();
    await page.waitForURL(/\/sign-in/);
  });
});
