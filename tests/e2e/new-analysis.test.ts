// The new-analysis page in Chromium: files go from the browser straight to the S3 fake (one PUT, or
// parts for a large file), the server previews them, and the mapped columns start an analysis.
// Open data: penguins from the `vega-datasets` npm package (BSD-3), split by island.
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import { eq } from "drizzle-orm";
import { afterAll, afterEach, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { findAnalysisForForm } from "@/db/queries/analysis-prefill";
import { memberships } from "@/db/schema";
import { SINGLE_PUT_MAX_BYTES } from "@/lib/uploads/file-rules";
import { loadPenguinsCsv } from "@/tests/lib/analysis/support/open-data";
import { createAccount, uniqueEmail } from "@/tests/support/accounts";
import { signUpThroughForm } from "./support/sign-up";
import { openBrowser, type BrowserSession } from "./support/browser";

const folder = mkdtempSync(path.join(os.tmpdir(), "partita-e2e-uploads-"));
const { csv, islandMap } = loadPenguinsCsv();
function writeFile(name: string, content: string | Buffer): string {
  const file = path.join(folder, name);
  writeFileSync(file, content);
  return file;
}

let browser: BrowserSession | undefined;
afterEach(async () => {
  await browser?.close();
  browser = undefined;
});
afterAll(async () => {
  rmSync(folder, { recursive: true, force: true });
  await closeDb();
});

/** Signs up through the form and returns the new workspace's id. */
async function signUp(session: BrowserSession, label: string): Promise<string> {
  return signUpThroughForm(session.page, {
    name: "Upload Tester",
    email: uniqueEmail(label),
    password: "an upload password",
    workspaceName: "Penguin shards",
  });
}

describe("starting an analysis in the browser", () => {
  it("uploads a dataset and a partition map, maps the columns and starts the run", async () => {
    browser = await openBrowser();
    const { page } = browser;
    const workspaceId = await signUp(browser, "mapper");
    await page.getByRole("link", { name: "New analysis" }).click();
    await page.waitForURL(/\/analyses\/new$/);

    // Refused in the browser before any byte is sent.
    await page.getByLabel("Dataset file").setInputFiles(writeFile("empty.csv", ""));
    await page.getByText('"empty.csv" is empty (0 bytes).').waitFor();

    await page.getByLabel("Dataset file").setInputFiles(writeFile("penguins.csv", csv));
    await page.getByRole("table").waitFor();
    const species = page.getByRole("columnheader", { name: /^Species/ });
    expect(await species.textContent()).toContain("categorical · 3 distinct");
    expect(await page.getByRole("radio", { name: /penguins\.csv/ }).isChecked()).toBe(true);

    await page.getByRole("radio", { name: /A separate partition map/ }).check();
    await page
      .getByLabel("Partition map file")
      .setInputFiles(writeFile("bad-map.csv", "row,island\n0,Biscoe\n"));
    await page.getByText(/bad-map\.csv: the header is "row,island"/).waitFor();
    await page.getByLabel("Partition map file").setInputFiles(writeFile("islands.csv", islandMap));
    await page.getByRole("radio", { name: /islands\.csv/ }).waitFor();

    await page.getByLabel("Label column", { exact: true }).selectOption("Species");
    await page.getByLabel("Id column (optional)").selectOption("row");
    // Every column but the label and id: the island and the five measurements and sex.
    expect(await page.locator('input[name="options.features"]:checked').count()).toBe(6);
    await page.getByRole("checkbox", { name: /^Island/ }).uncheck();

    // A bad plan value is explained on its field and nothing else is lost.
    await page.getByLabel("Rounds (R)").fill("");
    await page.getByRole("button", { name: "Run analysis" }).click();
    await page.getByText("Enter the number of rounds as a whole number.").waitFor();
    expect(await page.getByLabel("Label column", { exact: true }).inputValue()).toBe("Species");
    expect(await page.getByRole("radio", { name: /islands\.csv/ }).isChecked()).toBe(true);

    await page.getByLabel("Rounds (R)").fill("50");
    await page.getByLabel("Rounds (R)").press("Enter");
    await page.waitForURL(/\/analyses\/(?!new)[\w-]+$/);
    const analysisId = new URL(page.url()).pathname.split("/").at(-1)!;

    const saved = await findAnalysisForForm(workspaceId, analysisId);
    expect(saved?.layoutFileId).toBeTruthy();
    expect(saved?.parameters).toMatchObject({
      labelColumn: "Species",
      idColumn: "row",
      rounds: 50,
      localSteps: 10,
      batchSize: 32,
      lambda: 1e-3,
      reference: "optimum",
      features: [
        "Beak Length (mm)",
        "Beak Depth (mm)",
        "Flipper Length (mm)",
        "Body Mass (g)",
        "Sex",
      ],
    });

    // "Run again" starts from the same choices.
    await page.goto(`/w/${workspaceId}/analyses/new?from=${analysisId}`);
    // The form fills its fields once it runs in the browser.
    // (Hydration can take seconds on a busy machine: wait for it rather than for a fixed second.)
    await expect
      .poll(() => page.getByLabel("Id column (optional)").inputValue(), { timeout: 60_000 })
      .toBe("row");
    expect(await page.getByLabel("Rounds (R)").inputValue()).toBe("50");
    expect(await page.getByRole("checkbox", { name: /^Island/ }).isChecked()).toBe(false);
  });

  it("reads a spreadsheet's semicolon CSV as detected, re-reads it as chosen, and checks M live", async () => {
    // What a spreadsheet on Windows saves as "CSV": Windows-1252 bytes, semicolons, decimal commas.
    const sites = ["north", "south", "east"];
    const cities = ["Zürich", "Genève", "München", "Malmö"];
    const lines = ["city;price;weight;label;site"];
    for (let row = 0; row < 12; row++) {
      const price = `${10 + row},${(row * 7) % 10}9`;
      lines.push(
        `${cities[row % 4]};${price};${row % 5},5;${row % 3 ? "yes" : "no"};${sites[row % 3]}`,
      );
    }
    const file = writeFile("prices.csv", Buffer.from(`${lines.join("\r\n")}\r\n`, "latin1"));

    browser = await openBrowser();
    const { page } = browser;
    const workspaceId = await signUp(browser, "reading");
    await page.goto(`/w/${workspaceId}/analyses/new`);
    await page.getByLabel("Dataset file").setInputFiles(file);
    await page.getByRole("table").waitFor();

    // The detected reading options lead, preselected.
    const selected = (label: string) =>
      page.getByLabel(label, { exact: true }).locator("option:checked").textContent();
    expect(await selected("Text encoding")).toBe("Windows-1252 (Latin-1) — detected");
    expect(await selected("Delimiter")).toBe("Semicolon (;) — detected");
    expect(await selected("Decimal mark")).toBe("Comma (17,99) — detected");
    const price = page.getByRole("columnheader", { name: /^price/ });
    expect(await price.textContent()).toContain("numeric");
    await page.getByRole("cell", { name: "Zürich" }).first().waitFor();

    // A decimal point chosen: the server reads the file again, and "17,09" is no number.
    await page.getByLabel("Decimal mark", { exact: true }).selectOption(".");
    await expect.poll(() => price.textContent(), { timeout: 30_000 }).toContain("categorical");
    // UTF-8 chosen: the file cannot be read so, said beside the choices.
    await page.getByLabel("Text encoding", { exact: true }).selectOption("utf-8");
    await page.getByText(/prices\.csv: the text is not valid UTF-8/).waitFor();
    await page.getByLabel("Text encoding", { exact: true }).selectOption("windows-1252");
    await page.getByLabel("Decimal mark", { exact: true }).selectOption("");
    await expect.poll(() => price.textContent(), { timeout: 30_000 }).toContain("numeric");
    await page.getByRole("checkbox", { name: /Count values that are not numbers/ }).check();

    // The shard column is guessed from its name; M above its 3 shards is flagged as it is typed.
    expect(await page.getByLabel("Shard column", { exact: true }).inputValue()).toBe("site");
    await page.getByRole("radio", { name: /A sample of shards/ }).check();
    await page.getByLabel("Shards per round (M)").fill("5");
    await page
      .getByText('Shards per round (M) is 5, but column "site" of "prices.csv" names 3 shards')
      .waitFor();
    await page.getByLabel("Shards per round (M)").fill("2");
    await page.getByText('The column "site" of "prices.csv" names 3 shards.').waitFor();

    await page.getByRole("checkbox", { name: /^city/ }).uncheck();
    await page.getByRole("button", { name: "Run analysis" }).click();
    await page.waitForURL(/\/analyses\/(?!new)[\w-]+$/);
    const analysisId = new URL(page.url()).pathname.split("/").at(-1)!;
    const saved = await findAnalysisForForm(workspaceId, analysisId);
    expect(saved?.parameters).toMatchObject({
      labelColumn: "label",
      shardColumn: "site",
      participants: 2,
      encoding: "windows-1252",
      badNumbersAsMissing: true,
      features: ["price", "weight"],
    });
    // The detected delimiter and decimal mark are left for the engine to detect again.
    expect(saved?.parameters.delimiter).toBeUndefined();
    expect(saved?.parameters.decimalMark).toBeUndefined();
  });

  it("sends a large file in parts with a progress bar and previews its beginning", async () => {
    const [header, ...rows] = csv.trim().split("\n");
    const block = `${rows.join("\n")}\n`;
    const copies = Math.ceil((SINGLE_PUT_MAX_BYTES + 1) / block.length);
    const large = writeFile("many-penguins.csv", `${header}\n${block.repeat(copies)}`);

    browser = await openBrowser();
    const { page } = browser;
    const workspaceId = await signUp(browser, "large");
    await page.goto(`/w/${workspaceId}/analyses/new`);
    await page.getByLabel("Dataset file").setInputFiles(large);
    await page.getByRole("progressbar").waitFor();
    await page.getByRole("radio", { name: /many-penguins\.csv/ }).waitFor();
    expect(
      await page.getByText("types and distinct values counted in the first 256 KB").count(),
    ).toBe(1);
  });

  it("keeps reviewers away from the page and its link", async () => {
    const owner = await createAccount("owner");
    browser = await openBrowser();
    const { page } = browser;
    const ownWorkspaceId = await signUp(browser, "reviewer");
    const [membership] = await db()
      .select({ userId: memberships.userId })
      .from(memberships)
      .where(eq(memberships.workspaceId, ownWorkspaceId));
    await db()
      .insert(memberships)
      .values({ workspaceId: owner.workspaceId, userId: membership.userId, role: "reviewer" });

    await page.goto(`/w/${owner.workspaceId}/analyses/new`);
    await page.waitForURL(new RegExp(`/w/${owner.workspaceId}/not-for-your-role\\?`));
    // The refusal explains itself instead of a silent redirect.
    await page.getByRole("heading", { name: "This page is not open to reviewers" }).waitFor();
    await page.getByText("Only owners and analysts may upload data and start analyses").waitFor();
    expect(await page.getByRole("link", { name: "New analysis" }).count()).toBe(0);
  });
});
