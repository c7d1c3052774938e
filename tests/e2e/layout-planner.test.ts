// The layout planner in Chromium, end to end with the worker: plan → comparison → export →
// analyse. Open data: penguins from the `vega-datasets` npm package (BSD-3). The outside checks
// are methods.md §8's: the downloaded comparison has its keys and ranking, and the downloaded map
// is `row_id,shard` over every kept row (344 penguins with a species) into the M shards asked for.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, afterEach, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import { loadPenguinsCsv } from "@/tests/lib/analysis/support/open-data";
import { uniqueEmail } from "@/tests/support/accounts";
import { openBrowser, type BrowserSession } from "./support/browser";
import { signUpThroughForm } from "./support/sign-up";

const folder = mkdtempSync(path.join(os.tmpdir(), "partita-e2e-layouts-"));
const { csv } = loadPenguinsCsv();

let browser: BrowserSession | undefined;
afterEach(async () => {
  await browser?.close();
  browser = undefined;
});
afterAll(async () => {
  rmSync(folder, { recursive: true, force: true });
  await closeDb();
});

describe("planning layouts in the browser", () => {
  it("plans, compares, exports the comparison and a map, and analyses the chosen layout", async () => {
    browser = await openBrowser();
    const { page } = browser;
    const workspaceId = await signUpThroughForm(page, {
      name: "Layout Planner",
      email: uniqueEmail("planner"),
      password: "a planner password",
      workspaceName: "Penguin layouts",
    });

    // The planner reads registered datasets; the analysis form is where files are uploaded.
    await page.goto(`/w/${workspaceId}/layouts/new`);
    await page.getByText("No dataset in this workspace yet.").waitFor();
    await page.getByRole("link", { name: "Upload a dataset" }).click();
    const datasetFile = path.join(folder, "penguins.csv");
    writeFileSync(datasetFile, csv);
    await page.getByLabel("Dataset file").setInputFiles(datasetFile);
    await page.getByRole("radio", { name: /penguins\.csv/ }).waitFor();

    await page.getByRole("link", { name: "Plan layouts" }).first().click();
    await page.waitForURL(/\/layouts$/);
    await page.getByText("No layout plans yet.").waitFor();
    await page.getByRole("link", { name: "Plan layouts" }).last().click();
    await page.waitForURL(/\/layouts\/new$/);
    // The defaults a practitioner expects are ticked; the group generators wait for a group column.
    await expect
      .poll(() => page.getByLabel("stratified").isChecked(), { timeout: 60_000 })
      .toBe(true);
    expect(await page.getByLabel("group-balanced").isDisabled()).toBe(true);
    await page.getByLabel("Label column").selectOption("Species");
    await page.getByLabel("Row id column").selectOption("row");
    await page.getByLabel("Shards (M)").fill("3");
    // Three candidates keep the run short: iid, stratified and the strongest Dirichlet skew.
    for (const generator of ["dirichlet", "classes", "quantity", "clusters"]) {
      for (const box of await page.getByRole("checkbox", { name: generator, exact: true }).all()) {
        if (await box.isChecked()) await box.uncheck();
      }
    }
    await page.getByRole("checkbox", { name: "dirichlet", exact: true }).first().check();
    await page.getByRole("button", { name: "Plan layouts" }).click();
    await page.waitForURL(/\/layouts\/(?!new)[\w-]+$/);

    // Progress per candidate until the plan ends, then the comparison.
    await page
      .getByRole("heading", { name: /Finished: 3 of 3 candidates scored/ })
      .waitFor({ timeout: 240_000 });
    await page.getByRole("link", { name: "Compare the candidates" }).click();
    await page.waitForURL(/\/compare$/);
    const table = page.getByTestId("candidate-table");
    await table.waitFor();
    expect(await table.locator("tbody tr").count()).toBe(3);
    await page.getByText("Read the verdict as a planning guide").waitFor();

    const comparisonDownload = page.waitForEvent("download");
    await page.getByRole("link", { name: "Download the comparison (JSON)" }).click();
    const comparisonFile = path.join(folder, "layouts.json");
    await (await comparisonDownload).saveAs(comparisonFile);
    const comparison = JSON.parse(readFileSync(comparisonFile, "utf8")) as {
      layouts: {
        name: string;
        seed: number;
        shards: number;
        summary: { advice: { ratio: number } };
      }[];
      failures: unknown[];
      shardCount: number;
    };
    expect(comparison.shardCount).toBe(3);
    expect(comparison.failures).toEqual([]);
    expect(comparison.layouts.map((layout) => layout.name).sort()).toEqual([
      "dirichlet-0.5",
      "iid",
      "stratified",
    ]);
    const ratios = comparison.layouts.map((layout) => layout.summary.advice.ratio);
    expect([...ratios].sort((a, b) => a - b)).toEqual(ratios);

    const mapDownload = page.waitForEvent("download");
    await page.getByRole("link", { name: "stratified.csv" }).click();
    const mapFile = path.join(folder, "stratified.csv");
    await (await mapDownload).saveAs(mapFile);
    const lines = readFileSync(mapFile, "utf8").trim().split("\n");
    expect(lines[0]).toBe("row_id,shard");
    expect(lines.length - 1).toBe(344);
    expect(new Set(lines.slice(1).map((line) => line.split(",")[1]))).toEqual(
      new Set(["s1", "s2", "s3"]),
    );

    // "Analyse this layout": the normal form, filled in with the dataset, the map and the options.
    await page.getByRole("button", { name: "Analyse the layout stratified" }).click();
    await page.waitForURL(/\/analyses\/new\?layoutPlan=/);
    await page.getByRole("heading", { name: "Analyse a planned layout" }).waitFor();
    await expect
      .poll(() => page.getByRole("radio", { name: /stratified\.csv/ }).isChecked(), {
        timeout: 60_000,
      })
      .toBe(true);
    expect(await page.getByLabel("Label column", { exact: true }).inputValue()).toBe("Species");
    await page.getByRole("button", { name: "Run analysis" }).click();
    await page.waitForURL(/\/analyses\/(?!new)[\w-]+$/);
    await page.waitForURL(/\/reports\/[\w-]+$/, { timeout: 240_000 });
  }, 600_000);
});
