// The review cycle through the server actions, against the real PostgreSQL and the SMTP fake that
// `npm test` starts: request → e-mails to the reviewers → comment with a mention → decisions →
// e-mail to the requester; decisions bound to one version; preferences; the role matrix.
// Reports are the CLI's summary of penguins by island (vega-datasets, BSD-3), stored as the worker does.
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";

vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));
// revalidatePath needs Next's request context, which a unit test does not have.
vi.mock("next/cache", () => ({ revalidatePath: () => undefined }));

import {
  decideReview,
  postComment,
  removeComment,
  requestReview,
  reviseComment,
} from "@/app/(workspace)/w/[workspaceId]/reports/[reportId]/review-actions";
import { updateNotificationSetting } from "@/app/(workspace)/w/[workspaceId]/settings/notifications/actions";
import { closeDb } from "@/db/client";
import { listAuditEntries } from "@/db/queries/audit";
import { findReviewOverview, findReviewStates } from "@/db/queries/reviews";
import type { PartitionSummary } from "@/lib/analysis";
import { createAccount, createTeam } from "@/tests/support/accounts";
import { actAs } from "@/tests/support/fake-session";
import { subjectsTo, waitForMessage } from "@/tests/support/mailbox";
import { analyzePenguinsWithCli, insertReport } from "@/tests/support/report-fixtures";

afterAll(closeDb);

let summary: PartitionSummary;
beforeAll(async () => {
  summary = await analyzePenguinsWithCli();
});

const statusOf = (result: { ok: boolean; status?: number }) => (result.ok ? 200 : result.status);

async function teamWithReport() {
  const team = await createTeam();
  const { reportId } = await insertReport({
    workspaceId: team.workspaceId,
    authorId: team.analyst.id,
    summary,
    title: "Penguins by island",
  });
  return { ...team, reportId };
}

describe("the review cycle", () => {
  it("refers, comments with a mention, decides, and e-mails each person concerned", async () => {
    const team = await teamWithReport();
    const { workspaceId, reportId } = team;
    const reportUrl = `/w/${workspaceId}/reports/${reportId}`;

    actAs(team.analyst);
    const asked = await requestReview(workspaceId, reportId, {
      reviewerIds: [team.reviewer.id, team.owner.id],
      note: "Please check the Torgersen shard.",
    });
    expect(asked).toEqual({ ok: true, data: { asked: 2 } });
    for (const person of [team.reviewer, team.owner]) {
      const message = await waitForMessage(person.email, /^Referred to you: Penguins by island/);
      expect(message.text).toContain(`${process.env.NEXTAUTH_URL}${reportUrl}`);
      expect(message.text).toContain("Test analyst referred the report");
      expect(message.text).toContain("> Please check the Torgersen shard.");
    }
    const referred = await findReviewOverview(workspaceId, reportId);
    expect(referred.state).toEqual({ kind: "with-reviewers", pending: 2 });
    // The note is on the page too, not only in the e-mail.
    expect(referred.requests.map((request) => request.note)).toEqual([
      "Please check the Torgersen shard.",
      "Please check the Torgersen shard.",
    ]);
    // Asking the same people again asks nobody new and sends nothing new.
    expect(await requestReview(workspaceId, reportId, { reviewerIds: [team.reviewer.id] })).toEqual(
      { ok: true, data: { asked: 0 } },
    );

    actAs(team.reviewer);
    const comment = await postComment(workspaceId, reportId, {
      body: "@Test analyst why is Torgersen so skewed?",
      anchorKind: "shard",
      anchor: "Torgersen",
    });
    expect(comment.ok && comment.data.mentioned).toBe(1);
    const mention = await waitForMessage(team.analyst.email, /mentioned you/);
    expect(mention.text).toContain("> @Test analyst why is Torgersen so skewed?");
    expect(mention.text).toContain(reportUrl);

    actAs(team.analyst);
    const reply = await postComment(workspaceId, reportId, {
      body: "Only Adelie penguins live there.",
      parentId: comment.ok ? comment.data.commentId : "",
    });
    expect(reply.ok).toBe(true);

    actAs(team.reviewer);
    expect(
      await decideReview(workspaceId, reportId, {
        decision: "endorse",
        reason: "The skew is explained by the islands.",
      }),
    ).toMatchObject({ ok: true });
    const approval = await waitForMessage(team.analyst.email, /^Endorsed: Penguins by island/);
    expect(approval.text).toContain("Test reviewer read the report");
    expect(approval.text).toContain("and endorsed the layout.");
    expect(approval.text).toContain("> The skew is explained by the islands.");
    expect(approval.text).toContain(reportUrl);
    expect((await findReviewOverview(workspaceId, reportId)).state).toEqual({
      kind: "with-reviewers",
      pending: 1,
    });

    actAs(team.owner);
    await decideReview(workspaceId, reportId, { decision: "endorse", reason: "Agreed." });
    const overview = await findReviewOverview(workspaceId, reportId);
    expect(overview.state).toEqual({ kind: "endorsed" });
    expect(
      overview.comments.map((entry) => [entry.anchorKind, entry.anchor, entry.parentId]),
    ).toEqual([
      ["shard", "Torgersen", null],
      [null, null, comment.ok ? comment.data.commentId : ""],
    ]);
    const audit = await listAuditEntries(workspaceId);
    expect(audit.map((entry) => entry.action).sort()).toEqual([
      "report.endorsed",
      "report.endorsed",
      "report.referred",
    ]);
  });

  it("lets a return for rework outweigh endorsements and requires a reason", async () => {
    const team = await teamWithReport();
    const { workspaceId, reportId } = team;
    actAs(team.analyst);
    await requestReview(workspaceId, reportId, { reviewerIds: [team.reviewer.id] });
    actAs(team.reviewer);
    const missingReason = await decideReview(workspaceId, reportId, {
      decision: "return",
      reason: "  ",
    });
    expect(
      missingReason.ok ? 200 : [missingReason.status, Object.keys(missingReason.fieldErrors)],
    ).toEqual([422, ["reason"]]);
    await decideReview(workspaceId, reportId, {
      decision: "return",
      reason: "Use a shuffled layout as a baseline.",
    });
    await waitForMessage(team.analyst.email, /^Returned for rework: Penguins by island/);
    actAs(team.owner);
    await decideReview(workspaceId, reportId, { decision: "endorse", reason: "Fine by me." });
    expect((await findReviewOverview(workspaceId, reportId)).state.kind).toBe("returned");
  });
});

describe("comments: their authors edit and delete them", () => {
  it("rewrites a comment, e-mails only the newly mentioned, and audits the earlier text", async () => {
    const team = await teamWithReport();
    const { workspaceId, reportId } = team;
    actAs(team.reviewer);
    const posted = await postComment(workspaceId, reportId, {
      body: "@Test analyst is Dream too small?",
    });
    if (!posted.ok) throw new Error(posted.message);
    const { commentId } = posted.data;
    await waitForMessage(team.analyst.email, /mentioned you/);

    // The analyst was mentioned already; the owner is new and the only one told.
    const edited = await reviseComment(workspaceId, reportId, {
      commentId,
      body: "@Test analyst @Test owner is Dream too small for K = 10?",
    });
    expect(edited).toEqual({ ok: true, data: { mentioned: 1 } });
    const ownerMail = await waitForMessage(team.owner.email, /mentioned you/);
    expect(ownerMail.text).toContain("> @Test analyst @Test owner is Dream too small for K = 10?");
    // Both were sent together, so the owner's arrival means a second one would be there too.
    const analystMentions = (await subjectsTo(team.analyst.email)).filter((subject) =>
      /mentioned you/.test(subject),
    );
    expect(analystMentions).toHaveLength(1);

    const [comment] = (await findReviewOverview(workspaceId, reportId)).comments;
    expect(comment).toMatchObject({
      body: "@Test analyst @Test owner is Dream too small for K = 10?",
      authorId: team.reviewer.id,
      deletedAt: null,
    });
    expect(comment.editedAt).toBeInstanceOf(Date);
    const [entry] = await listAuditEntries(workspaceId);
    expect(entry).toMatchObject({
      action: "comment.edited",
      actorEmail: team.reviewer.email,
      targetType: "comment",
      targetId: commentId,
      details: { title: "Penguins by island", before: "@Test analyst is Dream too small?" },
    });
    // An empty text is a comment's own error, on its field.
    expect(await reviseComment(workspaceId, reportId, { commentId, body: "  " })).toMatchObject({
      ok: false,
      status: 422,
      fieldErrors: { body: "Write a comment first." },
    });
  });

  it("refuses everyone but the author, and keeps the thread when its first comment goes", async () => {
    const team = await teamWithReport();
    const { workspaceId, reportId } = team;
    actAs(team.reviewer);
    const first = await postComment(workspaceId, reportId, { body: "Why three shards?" });
    if (!first.ok) throw new Error(first.message);
    const { commentId } = first.data;
    actAs(team.analyst);
    const reply = await postComment(workspaceId, reportId, {
      body: "One per island.",
      parentId: commentId,
    });
    if (!reply.ok) throw new Error(reply.message);

    // Not the author: 403, whatever their role; nothing changes.
    for (const person of [team.analyst, team.owner]) {
      actAs(person);
      expect(
        statusOf(await reviseComment(workspaceId, reportId, { commentId, body: "Changed." })),
      ).toBe(403);
      expect(statusOf(await removeComment(workspaceId, reportId, commentId))).toBe(403);
    }
    // Another workspace's member: 404; signed out: 401.
    actAs(await createAccount("stranger"));
    expect(statusOf(await removeComment(workspaceId, reportId, commentId))).toBe(404);
    actAs(null);
    expect(statusOf(await removeComment(workspaceId, reportId, commentId))).toBe(401);

    actAs(team.reviewer);
    expect(await removeComment(workspaceId, reportId, commentId)).toEqual({
      ok: true,
      data: undefined,
    });
    const comments = (await findReviewOverview(workspaceId, reportId)).comments;
    // The first comment stays as a deleted placeholder, its text gone; the reply keeps its thread.
    expect(comments.map((entry) => [entry.body, entry.deletedAt !== null, entry.parentId])).toEqual(
      [
        ["", true, null],
        ["One per island.", false, commentId],
      ],
    );
    const [entry] = await listAuditEntries(workspaceId);
    expect(entry).toMatchObject({
      action: "comment.deleted",
      actorEmail: team.reviewer.email,
      targetId: commentId,
      details: { before: "Why three shards?" },
    });
    // Gone is gone: neither edited nor deleted again.
    expect(statusOf(await removeComment(workspaceId, reportId, commentId))).toBe(404);
    expect(statusOf(await reviseComment(workspaceId, reportId, { commentId, body: "Back." }))).toBe(
      404,
    );
  });
});

describe("decisions belong to one version", () => {
  it("shows a new version as not referred while the old one stays endorsed", async () => {
    const team = await teamWithReport();
    const { workspaceId, reportId } = team;
    actAs(team.analyst);
    await requestReview(workspaceId, reportId, { reviewerIds: [team.reviewer.id] });
    actAs(team.reviewer);
    await decideReview(workspaceId, reportId, { decision: "endorse", reason: "Good." });
    const revision = await insertReport({
      workspaceId,
      authorId: team.analyst.id,
      summary,
      previousReportId: reportId,
    });
    const states = await findReviewStates(workspaceId, [reportId, revision.reportId]);
    expect(states.get(reportId)).toEqual({ kind: "endorsed" });
    expect(states.get(revision.reportId)).toEqual({ kind: "not-referred" });
    const overview = await findReviewOverview(workspaceId, revision.reportId);
    expect([overview.requests, overview.decisions, overview.comments]).toEqual([[], [], []]);
  });
});

describe("notification preferences", () => {
  it("stops an e-mail kind the person turned off and sends it again once turned on", async () => {
    const team = await teamWithReport();
    const { workspaceId, reportId } = team;
    actAs(team.analyst);
    expect(
      await updateNotificationSetting(workspaceId, { kind: "decision-made", enabled: false }),
    ).toEqual({ ok: true, data: undefined });
    await requestReview(workspaceId, reportId, { reviewerIds: [team.reviewer.id] });
    actAs(team.reviewer);
    await decideReview(workspaceId, reportId, { decision: "endorse", reason: "First look." });
    // A mention (still on) sent after the decision proves the mailbox is up to date when it arrives.
    await postComment(workspaceId, reportId, { body: `Thanks @${team.analyst.email}.` });
    await waitForMessage(team.analyst.email, /mentioned you/);
    expect(await subjectsTo(team.analyst.email)).toEqual([expect.stringMatching(/mentioned you/)]);

    actAs(team.analyst);
    await updateNotificationSetting(workspaceId, { kind: "decision-made", enabled: true });
    actAs(team.reviewer);
    await decideReview(workspaceId, reportId, { decision: "endorse", reason: "Second look." });
    const message = await waitForMessage(team.analyst.email, /^Endorsed/);
    expect(message.text).toContain("> Second look.");
  });

  it("refuses a signed-out caller and an unknown kind", async () => {
    actAs(null);
    expect(
      statusOf(await updateNotificationSetting("any", { kind: "mentioned", enabled: false })),
    ).toBe(401);
    actAs(await createAccount("prefs"));
    expect(
      statusOf(await updateNotificationSetting("any", { kind: "newsletter", enabled: false })),
    ).toBe(422);
  });
});

describe("review actions: roles", () => {
  it("lets only owners and analysts request, and only owners and reviewers decide", async () => {
    const team = await teamWithReport();
    const { workspaceId, reportId } = team;
    const decision = { decision: "endorse", reason: "ok" } as const;
    actAs(team.reviewer);
    expect(
      statusOf(await requestReview(workspaceId, reportId, { reviewerIds: [team.owner.id] })),
    ).toBe(403);
    actAs(team.analyst);
    expect(statusOf(await decideReview(workspaceId, reportId, decision))).toBe(403);
    expect(statusOf(await postComment(workspaceId, reportId, { body: "analysts comment" }))).toBe(
      200,
    );
    actAs(team.reviewer);
    expect(statusOf(await postComment(workspaceId, reportId, { body: "reviewers too" }))).toBe(200);
    expect(statusOf(await decideReview(workspaceId, reportId, decision))).toBe(200);
    actAs(team.owner);
    expect(statusOf(await decideReview(workspaceId, reportId, decision))).toBe(200);
  });

  it("refuses analysts as reviewers, oneself, and other workspaces' reports", async () => {
    const team = await teamWithReport();
    const { workspaceId, reportId } = team;
    actAs(team.owner);
    const analystAsReviewer = await requestReview(workspaceId, reportId, {
      reviewerIds: [team.analyst.id],
    });
    expect(analystAsReviewer.ok ? 200 : analystAsReviewer.fieldErrors).toEqual({
      reviewerIds: "Reviewers must be owners or reviewers of this workspace.",
    });
    expect(
      statusOf(await requestReview(workspaceId, reportId, { reviewerIds: [team.owner.id] })),
    ).toBe(422);
    // A report id from another workspace is "not found" even to an owner of this one.
    const other = await createAccount("other");
    const { reportId: foreignReport } = await insertReport({
      workspaceId: other.workspaceId,
      authorId: other.id,
      summary,
    });
    expect(
      statusOf(
        await requestReview(workspaceId, foreignReport, { reviewerIds: [team.reviewer.id] }),
      ),
    ).toBe(404);
    expect(statusOf(await postComment(workspaceId, foreignReport, { body: "hi" }))).toBe(404);
    expect(
      statusOf(
        await decideReview(workspaceId, foreignReport, { decision: "endorse", reason: "x" }),
      ),
    ).toBe(404);
  });

  it("gives 401 when signed out and 404 to a stranger", async () => {
    const team = await teamWithReport();
    const { workspaceId, reportId } = team;
    for (const user of [null, await createAccount("stranger")]) {
      actAs(user);
      const expected = user ? 404 : 401;
      expect(
        statusOf(await requestReview(workspaceId, reportId, { reviewerIds: [team.reviewer.id] })),
      ).toBe(expected);
      expect(statusOf(await postComment(workspaceId, reportId, { body: "hello" }))).toBe(expected);
      expect(
        statusOf(await decideReview(workspaceId, reportId, { decision: "endorse", reason: "x" })),
      ).toBe(expected);
    }
    // A refused call must send nothing. Mail leaves through the outbox in order, so once a mail
    // sent after the refusals has arrived, any mail they had sent would have arrived too: the
    // reviewer then holds that one message only.
    actAs(team.analyst);
    expect(
      (await requestReview(workspaceId, reportId, { reviewerIds: [team.reviewer.id] })).ok,
    ).toBe(true);
    await waitForMessage(team.reviewer.email, /^Referred to you: Penguins by island/);
    expect(await subjectsTo(team.reviewer.email)).toEqual([
      "Referred to you: Penguins by island (v1)",
    ]);
  });

  it("rejects a pin to a shard or section the report does not have", async () => {
    const team = await teamWithReport();
    actAs(team.reviewer);
    const shard = await postComment(team.workspaceId, team.reportId, {
      body: "x",
      anchorKind: "shard",
      anchor: "Atlantis",
    });
    expect(shard.ok ? 200 : shard.fieldErrors.anchor).toBe('This report has no shard "Atlantis".');
    const section = await postComment(team.workspaceId, team.reportId, {
      body: "x",
      anchorKind: "section",
      anchor: "appendix",
    });
    expect(statusOf(section)).toBe(422);
  });
});
