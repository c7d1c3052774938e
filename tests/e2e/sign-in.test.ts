import { afterEach, describe, expect, it } from "vitest";
import { findMessagesTo } from "@/lib/mail/dev-inbox";
import { uniqueEmail } from "@/tests/support/accounts";
import { openBrowser, type BrowserSession } from "./support/browser";

let browser: BrowserSession | undefined;
afterEach(async () => {
  await browser?.close();
  browser = undefined;
});

async function signUpThroughForm(session: BrowserSession, email: string, password: string) {
  const { page } = session;
  await page.goto("/sign-up");
  await page.getByLabel("Your name").fill("Browser Tester");
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByLabel("Workspace name").fill("Browser shards");
  await page.getByRole("button", { name: "Create account" }).click();
  await page.waitForURL(/\/w\/[\w-]+$/);
}

describe("signing in through the browser", () => {
  it("signs up, signs out, signs in with the password and lands on the workspace home", async () => {
    browser = await openBrowser();
    const { page } = browser;
    const email = uniqueEmail("browser");
    await signUpThroughForm(browser, email, "a browser password");
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in/);

    await page.getByLabel("E-mail").fill(email);
    await page.getByLabel("Password").fill("not the password");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.getByText("don't match an account").waitFor();
    // What the user typed is still there after the failure.
    expect(await page.getByLabel("E-mail").inputValue()).toBe(email);

    await page.getByLabel("Password").fill("a browser password");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/w\/[\w-]+$/);
    await expect
      .poll(() => page.getByRole("heading", { level: 1 }).textContent())
      .toBe("Browser shards");
    expect(await page.getByTestId("signed-in-as").textContent()).toBe(email);
    expect(await page.getByText("What to bring").isVisible()).toBe(true);
  });

  it("signs in with an e-mail link read from the development inbox", async () => {
    browser = await openBrowser();
    const { page } = browser;
    const email = uniqueEmail("linker");
    await signUpThroughForm(browser, email, "a link user password");
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in/);

    await page.getByRole("tab", { name: "E-mail link" }).click();
    await page.getByLabel("E-mail").fill(email);
    await page.getByRole("button", { name: "Send me a link" }).click();
    await page.waitForURL(/\/sign-in\/check-email/);

    let link: string | undefined;
    await expect
      .poll(async () => {
        const [message] = await findMessagesTo(email);
        link = message?.text.match(/https?:\/\/\S+\/api\/auth\/callback\/email\S+/)?.[0];
        return link;
      })
      .toBeTruthy();
    await page.goto(link!);
    await page.waitForURL(/\/w\/[\w-]+$/);
    expect(await page.getByTestId("signed-in-as").textContent()).toBe(email);
  });
});
