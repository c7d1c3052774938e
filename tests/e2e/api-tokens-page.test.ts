// The tokens page in Chromium: an analyst creates a token, sees it once, uses it on the API, and
// revokes it; after a reload the token is listed (with its last use) but never shown again.
import { afterEach, describe, expect, it } from "vitest";
import { uniqueEmail } from "@/tests/support/accounts";
import { signUpThroughForm } from "./support/sign-up";
import { openBrowser, type BrowserSession } from "./support/browser";

const baseUrl = process.env.E2E_BASE_URL ?? "http://127.0.0.1:3000";

let browser: BrowserSession | undefined;
afterEach(async () => {
  await browser?.close();
  browser = undefined;
});

async function callerStatus(token: string): Promise<number> {
  const response = await fetch(`${baseUrl}/api/v1/workspace`, {
    headers: { authorization: `Bearer ${token}` },
  });
  return response.status;
}

describe("API tokens page", () => {
  it("creates a token shown once, records its use, and revokes it", async () => {
    browser = await openBrowser();
    const { page } = browser;
    await signUpThroughForm(page, {
      name: "Token Tester",
      email: uniqueEmail("tokens"),
      password: "a token password",
      workspaceName: "Pipeline workspace",
    });

    await page.getByRole("link", { name: "API tokens" }).click();
    await page.getByLabel("Name").fill("nightly shard check");
    await page.getByLabel("Expires after").selectOption("30");
    await page.getByRole("button", { name: "Create token" }).click();
    const token = (await page.getByTestId("new-token").locator("code").textContent())?.trim() ?? "";
    expect(token).toMatch(/^prtk_[A-Za-z0-9_-]{43}$/);
    expect(await callerStatus(token)).toBe(200);

    await page.reload();
    const row = page
      .getByRole("table", { name: "Your tokens" })
      .getByRole("row", { name: /nightly shard check/ });
    await expect.poll(() => row.textContent()).not.toContain("Never");
    expect(await page.content()).not.toContain(token);

    page.once("dialog", (dialog) => void dialog.accept());
    await row.getByRole("button", { name: "Revoke" }).click();
    await expect.poll(() => row.textContent()).toContain("Revoked");
    expect(await callerStatus(token)).toBe(401);
  });
});
