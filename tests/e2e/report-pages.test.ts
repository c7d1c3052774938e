// The report pages in Chromium, on reports stored the way the worker stores them: the CLI's summary
// of penguins (vega-datasets, BSD-3) by island, once with the default plan and once revised to
// K = 1024, R = 10 (a local-updates verdict). Covers the list's filters in the URL, picking two to
// compare, the per-shard table's sorting and filter, and the printed layout.
import { eq } from "drizzle-orm";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { users } from "@/db/schema";
import { uniqueEmail } from "@/tests/support/accounts";
import { analyzePenguinsWithCli, insertReport } from "@/tests/support/report-fixtures";
import { signUpThroughForm } from "./support/sign-up";
import { openBrowser, type BrowserSession } from "./support/browser";

let browser: BrowserSession | undefined;
afterEach(async () => {
  await browser?.close();
  browser = undefined;
});
afterAll(closeDb);

const email = uniqueEmail("reports");
const password = "a report password";
let workspacePath: string;
const reportIds: string[] = [];

async function signIn(session: BrowserSession) {
  const { page } = session;
  await page.goto("/sign-in");
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL(/\/w\/[\w-]+$/);
}

beforeAll(async () => {
  const [defaultPlan, longRounds] = await Promise.all([
    analyzePenguinsWithCli(),
    analyzePenguinsWithCli(["--local-steps", "1024", "--rounds", "10"]),
  ]);
  const session = await openBrowser();
  const { page } = session;
  await signUpThroughForm(page, {
    name: "Report Reader",
    email,
    password,
    workspaceName: "Penguin reports",
  });
  workspacePath = new URL(page.url()).pathname;
  await session.close();

  const [user] = await db().select({ id: users.id }).from(users).where(eq(users.email, email));
  const workspaceId = workspacePath.split("/")[2];
  const first = await insertReport({
    workspaceId,
    authorId: user.id,
    summary: defaultPlan,
    title: "Penguins by island",
    createdAt: new Date(Date.UTC(2026, 0, 10, 9)),
  });
  const revision = await insertReport({
    workspaceId,
    authorId: user.id,
    summary: longRounds,
    title: "Penguins by island",
    previousReportId: first.reportId,
    createdAt: new Date(Date.UTC(2026, 0, 12, 9)),
  });
  reportIds.push(first.reportId, revision.reportId);
});

describe("report pages", () => {
  it("filters the list through the URL and compares two picked reports", async () => {
    browser = await openBrowser();
    const { page } = browser;
    await signIn(browser);
    // The overview now lists the reports instead of the what-to-bring guide.
    expect(await page.getByRole("heading", { name: "What to bring" }).count()).toBe(0);
    await page.getByRole("link", { name: "All reports" }).click();
    await page.waitForURL(/\/reports$/);
    const rows = page.locator("tbody tr");
    expect(await rows.count()).toBe(2);

    await page.getByLabel("Verdict").selectOption("local-updates");
    await page.getByRole("button", { name: "Apply" }).click();
    await page.waitForURL(/verdict=local-updates/);
    expect(await rows.count()).toBe(1);
    expect(await rows.first().getByText("Local updates").count()).toBe(1);
    await page.getByRole("link", { name: "Clear" }).click();
    await page.waitForURL(/\/reports$/);
    expect(await rows.count()).toBe(2);

    await page.getByRole("checkbox", { name: /version 1$/ }).check();
    await page.getByRole("checkbox", { name: /version 2$/ }).check();
    await page.getByRole("link", { name: "Compare the two selected" }).click();
    await page.waitForURL(/\/reports\/compare\?a=/);
    const verdictRow = page.getByRole("row", { name: /^Verdict/ });
    expect(await verdictRow.getByText("differs").count()).toBe(1);
    const planRow = page.getByRole("row", { name: /^Local steps K/ });
    expect(await planRow.getByRole("cell").allTextContents()).toEqual(["10", "1024", "differs"]);
    const batchRow = page.getByRole("row", { name: /^Batch size b/ });
    expect(await batchRow.getByText("differs").count()).toBe(0);
  });

  it("sorts and filters the per-shard table and prints without controls, charts within A4", async () => {
    browser = await openBrowser();
    const { page } = browser;
    await signIn(browser);
    await page.goto(`${workspacePath}/reports/${reportIds[0]}`);
    await page
      .getByRole("region", { name: "Label mix per shard" })
      .locator("svg")
      .first()
      .waitFor();
    expect(await page.getByText("A newer version (v2) exists.").count()).toBe(1);

    const table = page.getByRole("table", { name: /Per-shard figures/ });
    const shardIds = () => table.locator("tbody th").allTextContents();
    expect(await shardIds()).toEqual(["Biscoe", "Dream", "Torgersen"]);
    // Penguins by island: TV 0.558 (Torgersen), 0.378 (Biscoe), 0.360 (Dream); rows 52, 168, 124.
    // A first click on a figure sorts it largest first, a second click smallest first; the
    // server sorts, so each click is a navigation that carries the view in the URL.
    await table.getByRole("link", { name: "TV" }).click();
    await page.waitForURL(/sort=tv/);
    expect(await shardIds()).toEqual(["Torgersen", "Biscoe", "Dream"]);
    await table.getByRole("link", { name: "Rows" }).click();
    await page.waitForURL(/sort=rows(?!.*order)/);
    await table.getByRole("link", { name: /Rows/ }).click();
    await page.waitForURL(/sort=rows.*order=asc/);
    expect(await shardIds()).toEqual(["Torgersen", "Dream", "Biscoe"]);
    expect(await table.locator('th[aria-sort="ascending"]').textContent()).toContain("Rows");
    await page.getByLabel("Filter shards by id").fill("dre");
    await page.getByLabel("Filter shards by id").press("Enter");
    await page.waitForURL(/shard=dre/);
    expect(await shardIds()).toEqual(["Dream"]);
    // The filter keeps the sort.
    expect(page.url()).toMatch(/sort=rows/);

    await page.emulateMedia({ media: "print" });
    expect(await page.getByRole("link", { name: "Download JSON" }).isVisible()).toBe(false);
    expect(await page.getByLabel("Filter shards by id").isVisible()).toBe(false);
    const chartWidths = await page
      .locator("section[aria-labelledby] svg[role='img']")
      .evaluateAll((charts) => charts.map((chart) => chart.getBoundingClientRect().width));
    expect(chartWidths.length).toBeGreaterThanOrEqual(5);
    // An A4 page with the report's 14 mm margins leaves 182 mm, about 688 CSS pixels.
    expect(Math.max(...chartWidths)).toBeLessThanOrEqual(688);
  });
});
