// Refer → comment → endorse in Chromium, with the reviewer arriving signed out from the
// link in the e-mail the SMTP fake caught. The report is the CLI's summary of penguins by island
// (vega-datasets, BSD-3) stored as the worker stores it; the accounts are made in the database.
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { memberships } from "@/db/schema";
import { createAccountWithWorkspace } from "@/db/queries/workspaces";
import { hashPassword } from "@/lib/auth/password";
import { uniqueEmail } from "@/tests/support/accounts";
import { waitForMessage } from "@/tests/support/mailbox";
import { analyzePenguinsWithCli, insertReport } from "@/tests/support/report-fixtures";
import { openBrowser, type BrowserSession } from "./support/browser";

let browser: BrowserSession | undefined;
afterEach(async () => {
  await browser?.close();
  browser = undefined;
});
afterAll(closeDb);

const owner = { name: "Olive Owner", email: uniqueEmail("owner"), password: "owner pass 333" };
const analyst = { name: "Ada Analyst", email: uniqueEmail("analyst"), password: "analyst pass 1" };
const reviewer = {
  name: "Rowan Reviewer",
  email: uniqueEmail("reviewer"),
  password: "reviewer 22",
};
let workspaceId: string;
let reportPath: string;

beforeAll(async () => {
  const summary = await analyzePenguinsWithCli();
  const [ownerAccount, analystAccount, reviewerAccount] = await Promise.all(
    [owner, analyst, reviewer].map(async (person) =>
      createAccountWithWorkspace({
        name: person.name,
        email: person.email,
        passwordHash: await hashPassword(person.password),
        workspaceName: `${person.name}'s workspace`,
      }),
    ),
  );
  workspaceId = ownerAccount.workspaceId;
  await db()
    .insert(memberships)
    .values([
      { workspaceId, userId: analystAccount.userId, role: "analyst" },
      { workspaceId, userId: reviewerAccount.userId, role: "reviewer" },
    ]);
  const { reportId } = await insertReport({
    workspaceId,
    authorId: analystAccount.userId,
    summary,
    title: "Penguins by island",
  });
  reportPath = `/w/${workspaceId}/reports/${reportId}`;
});

async function fillSignInForm(session: BrowserSession, person: typeof analyst) {
  await session.page.getByLabel("E-mail").fill(person.email);
  await session.page.getByLabel("Password").fill(person.password);
  await session.page.getByRole("button", { name: "Sign in" }).click();
}

describe("review flow in the browser", () => {
  it("refers a report, the reviewer follows the e-mail link, comments and endorses the layout", async () => {
    browser = await openBrowser();
    let { page } = browser;
    await page.goto(reportPath);
    await page.waitForURL(/\/sign-in\?callbackUrl=/);
    await fillSignInForm(browser, analyst);
    await page.waitForURL((url) => url.pathname === reportPath);
    const review = page.getByRole("region", { name: "Review of version 1" });
    expect(await review.getByTestId("review-state").textContent()).toContain("Not referred");
    // Analysts request reviews but do not decide them.
    expect(await review.getByRole("button", { name: "Record decision" }).count()).toBe(0);
    await review.getByRole("checkbox", { name: /Rowan Reviewer/ }).check();
    await review.getByLabel("Note to the reviewers (optional)").fill("Is the island split fair?");
    await review.getByRole("button", { name: "Refer", exact: true }).click();
    await review.getByText("Referred to 1 person").waitFor();
    await review.getByText("With 1 reviewer").waitFor();
    await browser.close();

    const request = await waitForMessage(reviewer.email, /^Referred to you: Penguins by island/);
    const link = request.text.match(/https?:\/\/\S+\/reports\/[\w-]+/)?.[0];
    expect(link && new URL(link).pathname).toBe(reportPath);

    // Signed out, the link goes through sign-in and comes back to the report.
    browser = await openBrowser();
    page = browser.page;
    await page.goto(link ?? "");
    await page.waitForURL(/\/sign-in\?callbackUrl=/);
    await fillSignInForm(browser, reviewer);
    await page.waitForURL((url) => url.pathname === reportPath);
    const panel = page.getByRole("region", { name: "Review of version 1" });
    await panel
      .getByLabel("Comment", { exact: true })
      .fill("@Ada Analyst Torgersen holds only Adelie.");
    await panel.getByLabel("Pin to").selectOption("shard:Torgersen");
    await panel.getByRole("button", { name: "Post comment" }).click();
    const thread = panel.getByTestId("comment-thread");
    await thread.getByText("On: Shard Torgersen").waitFor();
    expect(await thread.getByText("Torgersen holds only Adelie.").count()).toBe(1);

    // Its author edits it in place, then posts a second thread and deletes that one.
    await thread.getByRole("button", { name: "Edit" }).click();
    await thread
      .getByLabel("Your comment")
      .fill("@Ada Analyst Torgersen holds only Adelie penguins.");
    await thread.getByRole("button", { name: "Save" }).click();
    // Saved: the form gives way to the comment, marked as edited.
    await thread.getByRole("form", { name: "Edit comment" }).waitFor({ state: "detached" });
    await thread.getByText("· edited").waitFor();
    expect(await thread.getByText("Torgersen holds only Adelie penguins.").count()).toBe(1);
    await panel.getByLabel("Comment", { exact: true }).fill("A second thought, soon withdrawn.");
    await panel.getByRole("button", { name: "Post comment" }).click();
    const second = thread.filter({ hasText: "A second thought" });
    await second.waitFor();
    page.once("dialog", (dialog) => void dialog.accept());
    await second.getByRole("button", { name: "Delete" }).click();
    await second.waitFor({ state: "detached" });
    expect(await thread.count()).toBe(1);

    await panel.getByRole("radio", { name: /Endorse the layout/ }).check();
    await panel.getByLabel("Reason").fill("The verdict follows from the island skew.");
    await panel.getByRole("button", { name: "Record decision" }).click();
    await panel.getByTestId("review-state").getByText("Endorsed").waitFor();
    expect(await panel.getByRole("list", { name: "Decisions" }).textContent()).toContain(
      "The verdict follows from the island skew.",
    );

    await page.goto(`/w/${workspaceId}/reports`);
    const row = page.locator("tbody tr").first();
    expect(await row.getByTestId("review-state").textContent()).toContain("Endorsed");

    const mention = await waitForMessage(analyst.email, /mentioned you/);
    expect(mention.text).toContain("Torgersen holds only Adelie.");
    const approval = await waitForMessage(analyst.email, /^Endorsed: Penguins by island \(v1\)/);
    expect(approval.text).toContain(reportPath);
    await browser.close();

    // The owner reads who decided what in the audit log, filtered to decisions.
    browser = await openBrowser();
    page = browser.page;
    await page.goto(`/w/${workspaceId}/audit`);
    await fillSignInForm(browser, owner);
    await page.waitForURL((url) => url.pathname === `/w/${workspaceId}/audit`);
    await page.getByLabel("Event").selectOption("report.endorsed");
    await page.getByRole("button", { name: "Apply" }).click();
    await page.waitForURL(/action=report.endorsed/);
    const entries = page
      .getByRole("table", { name: "Audit log, newest first" })
      .locator("tbody tr");
    expect(await entries.count()).toBe(1);
    expect(await entries.first().textContent()).toContain(reviewer.email);
    expect(await entries.first().textContent()).toContain(
      "The verdict follows from the island skew.",
    );

    // The owner deletes the report, typing its title to confirm; the log records the deletion.
    await page.goto(reportPath);
    await page.getByText("Delete this report…").click();
    const deletion = page.getByRole("form", { name: "Delete report" });
    await deletion.getByLabel(/Type the title to confirm/).fill("Penguins by island");
    await deletion.getByRole("button", { name: "Delete report" }).click();
    await page.waitForURL((url) => url.pathname === `/w/${workspaceId}/reports`);
    await page.getByText("Deleted “Penguins by island” with all its versions.").waitFor();
    await page.goto(`/w/${workspaceId}/audit?action=report.deleted`);
    expect(await entries.count()).toBe(1);
    expect(await entries.first().textContent()).toContain("its only version (v1)");
    // Four people's sessions in turn, each signing in: more than the default two minutes on a busy machine.
  }, 300_000);
});
