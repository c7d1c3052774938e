import { afterEach, describe, expect, it } from "vitest";
import { baseUrl, openBrowser, type BrowserSession } from "./support/browser";

let browser: BrowserSession | undefined;
afterEach(async () => {
  await browser?.close();
  browser = undefined;
});

/** The protections every response must carry (OWASP Secure Headers Project; common practice). */
function expectProtections(response: Response, what: string) {
  const policy = response.headers.get("content-security-policy") ?? "";
  expect(policy, what).toMatch(/frame-ancestors 'none'/);
  expect(policy, what).toMatch(/script-src 'self' 'nonce-/);
  expect(response.headers.get("x-frame-options"), what).toBe("DENY");
  expect(response.headers.get("x-content-type-options"), what).toBe("nosniff");
  expect(response.headers.get("referrer-policy"), what).toBe("same-origin");
}

describe("the running app's security headers", () => {
  it("are on pages, API answers, errors and static files", async () => {
    const signIn = await fetch(`${baseUrl()}/sign-in`);
    expectProtections(signIn, "page");
    const chunk = /<script src="(\/_next\/static\/[^"]+\.js)"/.exec(await signIn.text())?.[1];
    expect(chunk).toBeTruthy();
    const kinds: Array<[string, string, number]> = [
      ["home page", "/", 200],
      ["API error", "/api/v1/reports", 401],
      ["404 page", "/no-such-page", 404],
      ["static chunk", chunk!, 200],
      ["icon", "/icon.svg", 200],
    ];
    for (const [what, path, status] of kinds) {
      const response = await fetch(`${baseUrl()}${path}`, { redirect: "manual" });
      expect(response.status, what).toBe(status);
      expectProtections(response, what);
    }
  });

  it("refuse a server action from another origin or without one with 403", async () => {
    const post = (headers: Record<string, string>) =>
      fetch(`${baseUrl()}/sign-up`, {
        method: "POST",
        headers: { "next-action": "7f00aa", "content-type": "text/plain", ...headers },
        body: "[]",
      });
    expect((await post({ origin: "https://evil.example" })).status).toBe(403);
    expect((await post({})).status).toBe(403);
  });

  it("let the pages render and hydrate under the policy", async () => {
    browser = await openBrowser();
    const { page } = browser;
    const violations: string[] = [];
    page.on("console", (message) => {
      if (/Content Security Policy/i.test(message.text())) violations.push(message.text());
    });
    await page.goto("/sign-in");
    // The tabs only switch once React has hydrated the form.
    await page.getByRole("tab", { name: "E-mail link" }).click();
    await page.getByRole("button", { name: "Send me a link" }).waitFor();
    await page.goto("/no-such-page");
    expect(violations).toEqual([]);
  });
});
