import { afterEach, describe, expect, it } from "vitest";
import { openBrowser, type BrowserSession } from "./support/browser";

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
});
