// The whole flow in Chromium: drop a dataset and a partition map, map the columns, run, watch the
// worker finish, read the verdict and the evidence, and download the JSON summary.
// Open data: penguins from the `vega-datasets` npm package (BSD-3), split by island.
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, afterEach, describe, expect, it } from "vitest";
import { loadPenguinsCsv } from "@/tests/lib/analysis/support/open-data";
import { uniqueEmail } from "@/tests/support/accounts";
import { signUpThroughForm } from "./support/sign-up";
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

/** Signs up, uploads penguins and the island map, and maps the columns on the new-analysis form. */
async function fillPenguinAnalysis(session: BrowserSession, label: string) {
  const { page } = session;
  await signUpThroughForm(page, {
    name: "Flow Tester",
    email: uniqueEmail(label),
    password: "a flow password",
    workspaceName: "Penguin islands",
  });

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
}

describe("from upload to report in the browser", () => {
  it("runs an analysis of uploaded files and shows the verdict, a chart and the JSON export", async () => {
    browser = await openBrowser();
    const { page } = browser;
    await fillPenguinAnalysis(browser, "flow");
    await page.getByRole("button", { name: "Run analysis" }).click();

    // The progress page follows the worker and moves on to the report when it is stored.
    await page.waitForURL(/\/analyses\/(?!new)[\w-]+$/);
    await page.waitForURL(/\/reports\/[\w-]+$/, { timeout: 90_000 });

    // Penguins by island under the default plan: ρ between ½ and 2 (the same split as the CLI's in
    // tests/lib/reports/figures-from-cli.test.ts, which checks it against methods.md §5 by hand).
    const headline = (await page.locator("#verdict-heading").textContent())?.trim();
    expect(headline).toBe(VERDICT_HEADLINES["no-clear-winner"]);
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

  it("also simulates the plan: cost before the run, refusal on the field, curves in the report", async () => {
    browser = await openBrowser();
    const { page } = browser;
    await fillPenguinAnalysis(browser, "simulate");
    // Keyboard first: the option is a plain checkbox.
    await page.getByRole("checkbox", { name: /Also simulate/ }).focus();
    await page.keyboard.press("Space");
    expect(await page.getByLabel("Seeds (S)").inputValue()).toBe("3");
    // methods.md §7 at the default plan: 3 × 11 × R 100 · M 3 · K 10 · b 32 · (d+1) 8 · C 3.
    await page.getByText("Estimated cost: about 7.6×10⁷ multiply-adds").waitFor();

    // Far above the budget: the form warns, and the server refuses on the simulation's field.
    await page.getByLabel("Rounds (R)").fill("1000000");
    await page
      .getByText(/above the server's budget of 1\.0×10¹¹\. It fits with Rounds \(R\)/)
      .waitFor();
    await page.getByRole("button", { name: "Run analysis" }).click();
    const refusal = page.locator("#simulate-error");
    await refusal.waitFor();
    expect(await refusal.textContent()).toMatch(/^The simulation would take about 7\.6×10¹¹/);
    expect(await page.getByLabel("Label column", { exact: true }).inputValue()).toBe("Species");

    // A small plan keeps the run short: 3 × (8 + 2) runs of 20 rounds (a few more if a grid grows).
    await page.getByLabel("Rounds (R)").fill("20");
    await page.getByLabel("Seeds (S)").fill("2");
    await page.getByRole("button", { name: "Run analysis" }).click();
    await page.waitForURL(/\/analyses\/(?!new)[\w-]+$/);
    await page.waitForURL(/\/reports\/[\w-]+$/, { timeout: 90_000 });

    const section = page.getByRole("region", { name: "Simulation on your shards" });
    await section.waitFor();
    const table = section.getByRole("table");
    for (const name of ["Minibatch SGD", "Local SGD", "Drift-corrected local updates (SCAFFOLD)"]) {
      expect(await table.getByRole("rowheader", { name, exact: true }).count()).toBe(1);
    }
    // The verdicts side by side, and the sentence that compares them. This split and plan give no
    // clear winner from the bounds, and local updates from the seeded simulation (ρ_sim ≈ 0.40):
    // `npm run analyze -- --data penguins.csv --label Species --id-column row --shard-column Island
    // --rounds 20 --simulate --seeds 2` prints the same.
    const expected = {
      "From the bounds": VERDICT_HEADLINES["no-clear-winner"],
      "From the simulation": VERDICT_HEADLINES["local-updates"],
    };
    for (const [term, verdict] of Object.entries(expected)) {
      const chip = section
        .locator("dt", { hasText: term })
        .locator("xpath=following-sibling::dd[1]/span[1]");
      expect((await chip.textContent())?.trim()).toBe(verdict);
    }
    // The section's other note, when present, names step sizes at the grid's edge (methods.md §7).
    const comparison = section
      .getByRole("note")
      .filter({ hasText: /^The simulation on your shards/ });
    expect(await comparison.textContent()).toMatch(
      /^The simulation on your shards does not back the bounds' verdict: the bounds see no clear winner, but local SGD ended at 0\.4\d* times/,
    );
    await section.getByRole("img", { name: /suboptimality against rounds/ }).waitFor();
    await section.getByText("A convex proxy, not your network.").waitFor();

    const [download] = await Promise.all([
      page.waitForEvent("download"),
      page.getByRole("link", { name: "Download JSON" }).click(),
    ]);
    const summary = JSON.parse(readFileSync((await download.path())!, "utf8"));
    expect(summary.simulation.seeds).toBe(2);
    expect(summary.simulation.algorithms.map((result: { name: string }) => result.name)).toEqual([
      "minibatch",
      "local",
      "scaffold",
    ]);
  });
});
