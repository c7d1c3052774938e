// A federated analysis's pages in Chromium with two CLI clients: created from the form, keys issued
// once with the command a client runs (and one revoked), `npm run digest -- --server … --key …`
// run where each client's rows are, a tampered round-1 file uploaded on the third client's behalf
// refused by client and shard, the roster filling in by itself and closed without the third
// client (named in the confirmation), and the report built from the two clients' digests.
// Open data: penguins from the `vega-datasets` npm package (BSD-3), islands split between clients.
import { execFile } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import os from "node:os";
import path from "node:path";
import type { Page } from "playwright-core";
import { afterAll, afterEach, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import { splitAmongClients } from "@/tests/lib/analysis/digests/support";
import { loadPenguinsCsv } from "@/tests/lib/analysis/support/open-data";
import { uniqueEmail } from "@/tests/support/accounts";
import { baseUrl, openBrowser, type BrowserSession } from "./support/browser";
import { signUpThroughForm } from "./support/sign-up";

const root = path.resolve(import.meta.dirname, "../..");
const folder = mkdtempSync(path.join(os.tmpdir(), "partita-e2e-federated-"));
const [northCsv, southCsv, westCsv] = splitAmongClients(loadPenguinsCsv().csv, "Island", 3, 11);

let browser: BrowserSession | undefined;
afterEach(async () => {
  await browser?.close();
  browser = undefined;
});
afterAll(async () => {
  rmSync(folder, { recursive: true, force: true });
  await closeDb();
});

type Run = { code: number; stderr: string };

/** Runs `npm run digest -- …` where a client's data live (its CSV written to the test folder). */
function runDigest(client: string, csv: string, flags: string[]): Promise<Run> {
  const data = path.join(folder, `${client}.csv`);
  writeFileSync(data, csv);
  const args = ["--import", "tsx", "scripts/digest.ts", ...flags, "--data", data];
  args.push("--label", "Species", "--shard-column", "Island", "--id-column", "row");
  return new Promise((resolve) => {
    execFile(process.execPath, args, { cwd: root }, (error, _stdout, stderr) =>
      resolve({ code: error ? Number((error as { code?: number }).code ?? 1) : 0, stderr }),
    );
  });
}

/** Issues a key for `client` on the analysis page and reads it off the page, where it shows once. */
async function issueKey(page: Page, client: string): Promise<string> {
  await page.getByLabel("Client", { exact: true }).selectOption(client);
  await page.getByRole("button", { name: "Issue a key" }).click();
  const issued = page.getByTestId("issued-key");
  await issued.getByText(`Key for “${client}”`).waitFor();
  return (await issued.locator("code").first().textContent()) ?? "";
}

const rowCount = (csv: string) => csv.trim().split("\n").length - 1;

describe("a federated analysis in the browser", () => {
  it("runs with two CLI clients, refuses a bad file and goes on without the third", async () => {
    // Round 1 as a file, for the client without a network path; then tampered with.
    const written = await runDigest("west", westCsv, [
      "schema",
      "--out",
      path.join(folder, "w.json"),
    ]);
    expect(written.code).toBe(0);
    const tampered = JSON.parse(readFileSync(path.join(folder, "w.json"), "utf8"));
    tampered.shards[0].rows = 9;
    const tamperedFile = path.join(folder, "west-schema.json");
    writeFileSync(tamperedFile, JSON.stringify(tampered));

    browser = await openBrowser();
    const { page } = browser;
    await signUpThroughForm(page, {
      name: "Federated Tester",
      email: uniqueEmail("federated"),
      password: "a federated password",
      workspaceName: "Penguin clients",
    });

    await page
      .getByRole("navigation", { name: "Workspace" })
      .getByRole("link", { name: "Federated", exact: true })
      .click();
    await page.getByRole("heading", { name: "No federated analyses yet" }).waitFor();
    await page.getByRole("link", { name: "New federated analysis" }).click();
    await page.waitForURL(/\/federated\/new$/);

    // Refused in the browser, with every typed value kept.
    const form = page.getByRole("form", { name: "New federated analysis" });
    await page.getByLabel("Title").fill("Penguins by island, federated");
    await page.getByLabel("Expected clients").fill("north\nsouth\nnorth");
    await form.getByRole("button", { name: "Create the federated analysis" }).click();
    await page.getByText("Name the column that holds the label.").waitFor();
    await page.getByText("“north” is named twice.").waitFor();
    expect(await page.getByLabel("Title").inputValue()).toBe("Penguins by island, federated");

    await page.getByLabel("Label column").fill("Species");
    await page.getByLabel("Expected clients").fill("north\nsouth\nwest");
    await page.getByRole("radio", { name: /^Zero/ }).check();
    await form.getByRole("button", { name: "Create the federated analysis" }).click();
    await page.waitForURL(/\/federated\/[\w-]+$/);
    await page.getByRole("heading", { name: "Waiting for round 1" }).waitFor();
    const roster = page.getByRole("table", { name: "Roster" });
    expect(await roster.getByRole("rowheader").allTextContents()).toEqual([
      "north",
      "south",
      "west",
    ]);

    // A key shows once, with the exact command its client runs; revoked, it is marked so.
    const westKey = await issueKey(page, "west");
    expect(westKey).toMatch(/^prck_/);
    expect(await page.getByTestId("client-command").textContent()).toBe(
      `npm run digest -- --server ${baseUrl()} --key ${westKey} --data FILE --label Species --shard-column COL`,
    );
    const keys = page.getByRole("table", { name: "Client keys" });
    page.once("dialog", (dialog) => void dialog.accept());
    await keys.getByRole("button", { name: "Revoke" }).click();
    await keys.getByText(/^Revoked /).waitFor();

    // West's tampered file, uploaded on its behalf: refused by client and shard.
    const upload = page.getByRole("form", { name: "Upload a client's digest file" });
    await upload.getByLabel("On behalf of").selectOption("west");
    await upload.getByLabel("Digest file (JSON)").setInputFiles(tamperedFile);
    await upload.getByRole("button", { name: "Upload the digest" }).click();
    await upload
      .getByText(
        `west-schema.json: client "west", shard "${tampered.shards[0].id}" has 9 rows, under the minimum of 10`,
        { exact: false },
      )
      .waitFor();
    await roster.locator('tr[data-client="west"]').getByText("has 9 rows").waitFor();

    // Two clients run the command where their rows are; the roster fills in by itself.
    const northKey = await issueKey(page, "north");
    const southKey = await issueKey(page, "south");
    const server = ["--server", baseUrl()];
    const clients = Promise.all([
      runDigest("north", northCsv, [...server, "--key", northKey]),
      runDigest("south", southCsv, [...server, "--key", southKey]),
    ]);
    for (const [client, csv] of [
      ["north", northCsv],
      ["south", southCsv],
    ] as const) {
      const row = roster.locator(`tr[data-client="${client}"]`);
      await row.getByText("Round 1 sent").waitFor({ timeout: 60_000 });
      expect(await row.locator("td").nth(1).textContent()).toBe(rowCount(csv).toLocaleString("en"));
    }
    await page.getByText("Waiting for round 1 from “west”.").waitFor();

    // Closing the roster names who is left out; then the coordinator and the clients finish.
    let question = "";
    page.once("dialog", (dialog) => {
      question = dialog.message();
      void dialog.accept();
    });
    await page.getByRole("button", { name: "Close the roster" }).click();
    await roster.getByText("left out").waitFor();
    expect(question).toContain("without “west”?");
    await page.getByRole("link", { name: "Open the report" }).waitFor({ timeout: 180_000 });
    const runs = await clients;
    for (const run of runs) {
      expect(run.stderr).toContain("the analysis is done");
      expect(run.code).toBe(0);
    }

    // The report says what it was built from, and who was missing.
    await page.getByRole("link", { name: "Open the report" }).click();
    await page.waitForURL(/\/reports\/[\w-]+$/);
    const built = page.getByRole("region", { name: "Built from client digests" });
    await built.waitFor();
    expect(await built.textContent()).toContain(
      `2 clients sent counts and sums of their own shards`,
    );
    const sent = built.getByRole("table", { name: "What each client sent" });
    expect(await sent.getByRole("rowheader").allTextContents()).toEqual(["north", "south"]);
    await built.getByText("Missing: “west”", { exact: false }).waitFor();
    // The digests' caution is among the page's cautions, once.
    const caution = page.getByText("not a differential-privacy guarantee", { exact: false });
    expect(await caution.count()).toBe(1);
    await page
      .getByRole("complementary", { name: "Cautions" })
      .getByText("not a differential-privacy guarantee", { exact: false })
      .waitFor();
  }, 300_000);
});
