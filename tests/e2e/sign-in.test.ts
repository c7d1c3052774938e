import { afterEach, describe, expect, it } from "vitest";
import { createAccountWithWorkspace } from "@/db/queries/workspaces";
import { hashPassword } from "@/lib/auth/password";
import { waitForMessage } from "@/tests/support/mailbox";
import { uniqueEmail } from "@/tests/support/accounts";
import { baseUrl, openBrowser, type BrowserSession } from "./support/browser";
import { confirmationLinkFor, signUpThroughForm } from "./support/sign-up";

let browser: BrowserSession | undefined;
afterEach(async () => {
  await browser?.close();
  browser = undefined;
});

/** Requests a workspace page with the given cookies, without following redirects. */
async function visitWithCookies(path: string, cookies: { name: string; value: string }[]) {
  return fetch(`${baseUrl()}${path}`, {
    redirect: "manual",
    headers: { cookie: cookies.map(({ name, value }) => `${name}=${value}`).join("; ") },
  });
}

describe("signing up and in through the browser", () => {
  it("proves the address before the account works, and sign-out ends the session at once", async () => {
    browser = await openBrowser();
    const { page, context } = browser;
    const email = uniqueEmail("browser");

    // Before the e-mailed link is followed, the password signs nobody in.
    await page.goto("/sign-up");
    await page.getByLabel("Your name").fill("Browser Tester");
    await page.getByLabel("E-mail").fill(email);
    await page.getByLabel("Password").fill("a browser password");
    await page.getByLabel("Workspace name").fill("Browser shards");
    await page.getByRole("button", { name: "Create account" }).click();
    await page.getByRole("heading", { name: "Check your e-mail" }).waitFor();
    await page.goto("/sign-in");
    await page.getByLabel("E-mail").fill(email);
    await page.getByLabel("Password").fill("a browser password");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.getByText("Confirm your e-mail address first").waitFor();

    await page.goto(await confirmationLinkFor(email));
    await page.getByRole("button", { name: "Confirm and create my account" }).click();
    await page.getByText("Your address is confirmed").waitFor();
    // The address is filled in; what remains is the password.
    expect(await page.getByLabel("E-mail").inputValue()).toBe(email);
    await page.getByLabel("Password").fill("not the password");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.getByText("don't match an account").waitFor();
    await page.getByLabel("Password").fill("a browser password");
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/w\/[\w-]+$/);
    await expect
      .poll(() => page.getByRole("heading", { level: 1 }).textContent())
      .toBe("Browser shards");
    expect(await page.getByTestId("signed-in-as").textContent()).toBe(email);
    expect(await page.getByText("What to bring").isVisible()).toBe(true);

    const workspacePath = new URL(page.url()).pathname;
    const cookies = await context.cookies();
    expect((await visitWithCookies(workspacePath, cookies)).status).toBe(200);
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in/);
    // The cookie copied before signing out no longer opens the workspace.
    const replayed = await visitWithCookies(workspacePath, cookies);
    expect(replayed.status).toBe(307);
    expect(replayed.headers.get("location")).toMatch(/\/sign-in\?callbackUrl=/);
  });

  it("signs in with an e-mail link read from the development inbox", async () => {
    browser = await openBrowser();
    const { page } = browser;
    const email = uniqueEmail("linker");
    await signUpThroughForm(page, {
      name: "Link User",
      email,
      password: "a link user password",
      workspaceName: "Link shards",
    });
    await page.getByRole("button", { name: "Sign out" }).click();
    await page.waitForURL(/\/sign-in/);

    await page.getByRole("tab", { name: "E-mail link" }).click();
    await page.getByLabel("E-mail").fill(email);
    await page.getByRole("button", { name: "Send me a link" }).click();
    await page.waitForURL(/\/sign-in\/check-email/);

    // The link leaves through the outbox, which the worker empties about once a second.
    const message = await waitForMessage(email, /sign-in link/);
    const link = message.text.match(/https?:\/\/\S+\/api\/auth\/callback\/email\S+/)?.[0];
    expect(link).toBeTruthy();
    await page.goto(link!);
    await page.waitForURL(/\/w\/[\w-]+$/);
    expect(await page.getByTestId("signed-in-as").textContent()).toBe(email);
  });

  it("stays on the app's own origin whatever callbackUrl says", async () => {
    const email = uniqueEmail("redirected");
    await createAccountWithWorkspace({
      name: "Redirect Target",
      email,
      passwordHash: await hashPassword("a redirect password"),
      workspaceName: "Home shards",
    });
    const origin = new URL(baseUrl()).origin;
    // The three payloads as they were sent: a backslash and a tab that browsers read as `//`, and
    // the app's own origin followed by another host (which used to crash sign-in with a 500).
    const payloads = [
      "/%5Cevil.example/x",
      "/%09/evil.example/x",
      encodeURIComponent(`${origin}.evil.example/`),
    ];
    browser = await openBrowser();
    const { page, context } = browser;
    for (const payload of payloads) {
      await context.clearCookies();
      await page.goto(`/sign-in?callbackUrl=${payload}`);
      await page.getByLabel("E-mail").fill(email);
      await page.getByLabel("Password").fill("a redirect password");
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.waitForURL(/\/w\/[\w-]+$/);
      expect(new URL(page.url()).origin, payload).toBe(origin);
    }
  });
});
