import type { Page } from "playwright-core";
import { waitForMessage } from "@/tests/support/mailbox";

export type NewAccount = { name: string; email: string; password: string; workspaceName: string };

/** The confirmation link e-mailed to `email`, read from the SMTP fake as its owner would. */
export async function confirmationLinkFor(email: string): Promise<string> {
  const message = await waitForMessage(email, /Confirm your address/);
  const link = message.text.match(/https?:\/\/\S+\/sign-up\/confirm\?\S+/)?.[0];
  if (!link) throw new Error(`the confirmation e-mail to ${email} holds no link`);
  return link;
}

/**
 * Signs up through the form as a person would: submit, follow the e-mailed link, confirm, sign in
 * with the chosen password. Ends on the new workspace's page; returns its id.
 */
export async function signUpThroughForm(page: Page, account: NewAccount): Promise<string> {
  await page.goto("/sign-up");
  await page.getByLabel("Your name").fill(account.name);
  await page.getByLabel("E-mail").fill(account.email);
  await page.getByLabel("Password").fill(account.password);
  await page.getByLabel("Workspace name").fill(account.workspaceName);
  await page.getByRole("button", { name: "Create account" }).click();
  await page.waitForURL(/\/sign-up\/check-email/);
  await page.goto(await confirmationLinkFor(account.email));
  await page.getByRole("button", { name: "Confirm and create my account" }).click();
  await page.waitForURL(/\/sign-in\?/);
  await page.getByLabel("Password").fill(account.password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(/\/w\/[\w-]+$/);
  return new URL(page.url()).pathname.split("/")[2];
}
