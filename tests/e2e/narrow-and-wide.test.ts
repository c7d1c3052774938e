// Every signed-in page at a phone's width (390 px) and a desktop's (1440 px) in Chromium: nothing
// scrolls sideways, the navigation reaches every page, and the report's charts and key figures are
// there. The report is the CLI's summary of penguins (vega-datasets, BSD-3) split by island, stored
// the way the worker stores it. Set E2E_SCREENSHOTS to a folder to keep a picture of each page.
import path from "node:path";
import { eq } from "drizzle-orm";
import type { Page } from "playwright-core";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { users } from "@/db/schema";
import { uniqueEmail } from "@/tests/support/accounts";
import {
  analyzePenguinColoniesWithCli,
  analyzePenguinsWithCli,
  insertReport,
} from "@/tests/support/report-fixtures";
import { openBrowser, type BrowserSession } from "./support/browser";
import { signUpThroughForm } from "./support/sign-up";

let browser: BrowserSession | undefined;
afterEach(async () => {
  await browser?.close();
  browser = undefined;
});
afterAll(closeDb);

const email = uniqueEmail("widths");
const password = "a phone and desk password";
let workspacePath = "";
let reportId = "";
/** A report of 24 shards: as many as the agreement heat map names beside its cells. */
let coloniesReportId = "";

/**
 * Page width beyond the viewport (0 when nothing scrolls sideways), with the innermost elements
 * that stick out, so a failure says where to look.
 */
function sidewaysOverflow(page: Page): Promise<{ overflow: number; offenders: string[] }> {
  return page.evaluate(() => {
    const width = document.documentElement.clientWidth;
    const overflow = document.documentElement.scrollWidth - width;
    if (overflow <= 0) return { overflow: 0, offenders: [] };
    const sticking = [...document.body.querySelectorAll("*")].filter(
      (element) => element.getBoundingClientRect().right > width + 1,
    );
    const innermost = sticking.filter(
      (element) => !sticking.some((o) => element.contains(o) && o !== element),
    );
    return {
      overflow,
      offenders: innermost
        .slice(0, 5)
        .map(
          (element) =>
            `${element.tagName.toLowerCase()}.${element.className}: ${element.textContent?.slice(0, 40)}`,
        ),
    };
  });
}

/**
 * Pairs of texts in a chart's drawing whose boxes overlap (by more than half a pixel each way),
 * named by their texts, so a failure says which labels smear into each other.
 */
function overlappingLabels(page: Page, chart: string): Promise<string[]> {
  return page
    .getByRole("region", { name: chart })
    .locator("svg")
    .first()
    .evaluate((svg) => {
      const boxes = [...svg.querySelectorAll("text")]
        .filter((text) => (text.textContent ?? "").trim() !== "")
        .map((text) => ({ text: text.textContent ?? "", box: text.getBoundingClientRect() }));
      const overlaps: string[] = [];
      boxes.forEach((a, i) => {
        for (const b of boxes.slice(i + 1)) {
          const across = Math.min(a.box.right, b.box.right) - Math.max(a.box.left, b.box.left);
          const down = Math.min(a.box.bottom, b.box.bottom) - Math.max(a.box.top, b.box.top);
          if (across > 0.5 && down > 0.5) overlaps.push(`${a.text} × ${b.text}`);
        }
      });
      return overlaps;
    });
}

async function keepPicture(page: Page, name: string) {
  const folder = process.env.E2E_SCREENSHOTS;
  if (folder) await page.screenshot({ path: path.join(folder, `${name}.png`), fullPage: true });
}

beforeAll(async () => {
  const summary = await analyzePenguinsWithCli();
  const colonies = await analyzePenguinColoniesWithCli(24);
  const session = await openBrowser();
  const { page } = session;
  await signUpThroughForm(page, {
    name: "Width Tester",
    email,
    password,
    workspaceName: "Penguins at every width",
  });
  workspacePath = new URL(page.url()).pathname;
  await session.close();
  const [user] = await db().select({ id: users.id }).from(users).where(eq(users.email, email));
  ({ reportId } = await insertReport({
    workspaceId: workspacePath.split("/")[2],
    authorId: user.id,
    summary,
    title: "Penguins by island",
    createdAt: new Date(Date.UTC(2026, 0, 10, 9)),
  }));
  ({ reportId: coloniesReportId } = await insertReport({
    workspaceId: workspacePath.split("/")[2],
    authorId: user.id,
    summary: colonies,
    title: "Penguins in 24 colonies",
    createdAt: new Date(Date.UTC(2026, 0, 10, 10)),
  }));
});

describe.each([
  ["phone", 390, 844],
  ["desktop", 1440, 900],
])("signed-in pages on a %s (%i px wide)", (device, width, height) => {
  it("scroll only downwards, and the navigation reaches every page", async () => {
    browser = await openBrowser();
    const { page } = browser;
    await page.setViewportSize({ width, height });
    await page.goto("/sign-in");
    await page.getByLabel("E-mail").fill(email);
    await page.getByLabel("Password").fill(password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/w\/[\w-]+$/);

    const navigation = page.getByRole("navigation", { name: "Workspace" });
    const pages = [
      ["Overview", /\/w\/[\w-]+$/],
      ["Reports", /\/reports$/],
      ["New analysis", /\/analyses\/new$/],
      ["Federated", /\/federated$/],
      ["Members", /\/members$/],
      ["Audit log", /\/audit$/],
      ["API tokens", /\/tokens$/],
    ] as const;
    for (const [name, address] of pages) {
      await navigation.getByRole("link", { name, exact: true }).click();
      await page.waitForURL(address);
      await page.getByRole("heading", { level: 1 }).first().waitFor();
      expect({ page: name, ...(await sidewaysOverflow(page)) }).toEqual({
        page: name,
        overflow: 0,
        offenders: [],
      });
      await keepPicture(page, `${device}-${name.toLowerCase().replace(/ /g, "-")}`);
    }

    await page.goto(`${workspacePath}/settings/notifications`);
    await page.getByRole("heading", { level: 1 }).first().waitFor();
    expect(await sidewaysOverflow(page)).toEqual({ overflow: 0, offenders: [] });
  });

  it("shows the report with its charts and explained figures, without sideways scrolling", async () => {
    browser = await openBrowser();
    const { page } = browser;
    await page.setViewportSize({ width, height });
    await page.goto("/sign-in");
    await page.getByLabel("E-mail").fill(email);
    await page.getByLabel("Password").fill(password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL(/\/w\/[\w-]+$/);
    await page.goto(`${workspacePath}/reports/${reportId}`);
    for (const chart of [
      "Label mix per shard",
      "Gradient agreement between shards",
      "Regime map",
    ]) {
      await page.getByRole("region", { name: chart }).locator("svg").first().waitFor();
    }
    const figures = page.getByRole("region", { name: "Key figures" });
    expect(
      await figures.getByText(/of all per-row gradient variance lies between shards/).count(),
    ).toBe(1);
    expect(await figures.getByText(/× the barrier H²B²\/R/).count()).toBe(1);
    expect(await page.getByText("(from memory)").count()).toBe(0);
    expect(await sidewaysOverflow(page)).toEqual({ overflow: 0, offenders: [] });
    // The regime map's 13 round counts and 13 step counts stay legible at this width.
    // (The chart spaces its labels once it has measured its width: wait for that, not a second.)
    await expect.poll(() => overlappingLabels(page, "Regime map")).toEqual([]);
    await keepPicture(page, `${device}-report`);

    // 24 shard names beside the agreement heat map's cells, and the regime map again.
    await page.goto(`${workspacePath}/reports/${coloniesReportId}`);
    for (const chart of ["Gradient agreement between shards", "Regime map"]) {
      const drawing = page.getByRole("region", { name: chart }).locator("svg").first();
      await drawing.waitFor();
      await expect
        .poll(async () => ({ chart, overlaps: await overlappingLabels(page, chart) }))
        .toEqual({ chart, overlaps: [] });
    }
    expect(await sidewaysOverflow(page)).toEqual({ overflow: 0, offenders: [] });
    await keepPicture(page, `${device}-report-24-shards`);

    await page.goto(`${workspacePath}/reports/compare?a=${reportId}&b=${reportId}`);
    await page.getByRole("heading", { level: 1 }).first().waitFor();
    expect(await sidewaysOverflow(page)).toEqual({ overflow: 0, offenders: [] });
    await keepPicture(page, `${device}-compare`);
  });
});
