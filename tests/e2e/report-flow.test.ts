// The whole flow in Chromium: drop a dataset and a partition map, map the columns, run, watch the
// worker finish, read the verdict and the evidence, and download the JSON summary.
// Open data: penguins from the `vega-datasets` npm package (BSD-3), split by island.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, afterEach, describe, expect, it } from "vitest";
import { loadPenguinsCsv } from "@/tests/lib/analysis/support/open-data";
import { uniqueEmail } from "@/tests/support/accounts";
import { openBrowser, type BrowserSession } from "./support/browser";

const folder = mkdtempSync(path.join(os.tmpdir(), "partita-e2e-flow-"));
const { csv, islandMap } = loadPenguinsCsv();
const datasetFile = path.join(folder, "penguins.csv");
const layoutFile = path.join(folder, "islands.csv");
writeFileSync(datasetFile, csv);
writeFileSync(layoutFile, islandMap);

const VERDICT_HEADLINES: Record<string, string> = {
  "local-updates": "Local updates",
  "large-minibatch": "Large minibatches",
  "no-clear-winner": "No clear winner",
};

let browser: BrowserSession | undefined;
afterEach(async () => {
  await browser?.close();
  browser = undefined;
});
afterAll(() => rmSync(folder, { recursive: true, force: true }));

describe("from upload to report in the browser", () => {
  it("runs an analysis of uploaded files and shows the verdict, a chart and the JSON export", async () => {
    browser = await openBrowser();
    const { page } = browser;
    await page.goto("/sign-up");
    await page.getByLabel("Your name").fill("Flow Tester");
    await page.getByLabel("E-mail").fill(uniqueEmail("flow"));
    await page.getByLabel("Password").fill("a flow password");
    await page.getByLabel("Workspace name").fill("Penguin islands");
    await page.getByRole("button", { name: "Create account" }).click();
    await page.waitForURL(/\/w\/[\w-]+$/);

    await page.getByRole("link", { name: "New analysis" }).click();
    await page.getByLabel("Dataset file").setInputFiles(datasetFile);
    await page.getByRole("radio", { name: /penguins\.csv/ }).waitFor();
    await page.getByRole("radio", { name: /A separate partition map/ }).check();
    await page.getByLabel("Partition map file").setInputFiles(layoutFile);
    await page.getByRole("radio", { name: /islands\.csv/ }).waitFor();
    await page.getByLabel("Label column", { exact: true }).selectOption("Species");
    await page.getByLabel("Id column (optional)").selectOption("row");
    // The island decides the shard, so it is not also a feature.
    await page.getByRole("checkbox", { name: /^Island/ }).uncheck();
    await page.getByRole("button", { name: "Run analysis" }).click();

    // The progress page follows the worker and moves on to the report when it is stored.
    await page.waitForURL(/\/analyses\/(?!new)[\w-]+$/);
    await page.waitForURL(/\/reports\/[\w-]+$/, { timeout: 90_000 });

    const headline = (await page.locator("#verdict-heading").textContent())?.trim();
    expect(Object.values(VERDICT_HEADLINES)).toContain(headline);
    const labelMix = page.getByRole("region", { name: "Label mix per shard" });
    await labelMix.locator("svg").first().waitFor();
    // Three islands, three shards on the chart's axis.
    for (const island of ["Biscoe", "Dream", "Torgersen"]) {
      expect(await labelMix.getByText(island, { exact: true }).count()).toBeGreaterThan(0);
    }

    const [download] = await Promise.all([
      page.waitForEvent("download"),
      page.getByRole("link", { name: "Download JSON" }).click(),
    ]);
    const summary = JSON.parse(readFileSync((await download.path())!, "utf8"));
    expect(VERDICT_HEADLINES[summary.advice.verdict]).toBe(headline);
    expect(summary.dataset).toMatchObject({ task: "classification", classes: 3 });
    expect(summary.shards.map((shard: { id: string }) => shard.id)).toEqual([
      "Biscoe",
      "Dream",
      "Torgersen",
    ]);
  });
});
