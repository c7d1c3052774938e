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
function writeFile(name: string, content: string): string {
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
