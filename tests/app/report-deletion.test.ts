// Deleting a report (issue 5: "every … deletion goes into an audit log"): owners only, the typed
// title as confirmation, every version with its reviews goes, the uploads stay, one audit entry,
// and a report with a re-run still queued is kept. Against the real PostgreSQL `npm test` starts;
// reports are the CLI's summary of penguins by island (vega-datasets, BSD-3), stored as the worker does.
import { and, eq, inArray } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";

vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));
// revalidatePath needs Next's request context, which a unit test does not have.
vi.mock("next/cache", () => ({ revalidatePath: () => undefined }));

import { deleteReport } from "@/app/(workspace)/w/[workspaceId]/reports/[reportId]/delete-actions";
import { postComment } from "@/app/(workspace)/w/[workspaceId]/reports/[reportId]/review-actions";
import { closeDb, db } from "@/db/client";
import { listAuditEntries } from "@/db/queries/audit";
import { analyses, dataFiles, reports, reviewComments } from "@/db/schema";
import type { PartitionSummary } from "@/lib/analysis";
import { createTeam } from "@/tests/support/accounts";
import { actAs } from "@/tests/support/fake-session";
import { analyzePenguinsWithCli, insertReport } from "@/tests/support/report-fixtures";

afterAll(closeDb);

let summary: PartitionSummary;
beforeAll(async () => {
  summary = await analyzePenguinsWithCli();
});

const TITLE = "Penguins by island";

/** A team whose report has two versions, with a comment on the first. */
async function teamWithTwoVersions() {
  const team = await createTeam();
  const first = await insertReport({
    workspaceId: team.workspaceId,
    authorId: team.analyst.id,
    summary,
    title: TITLE,
  });
  const second = await insertReport({
    workspaceId: team.workspaceId,
    authorId: team.analyst.id,
    summary,
    title: TITLE,
    previousReportId: first.reportId,
  });
  actAs(team.reviewer);
  expect((await postComment(team.workspaceId, first.reportId, { body: "Why Biscoe?" })).ok).toBe(
    true,
  );
  return { ...team, first, second };
}

async function countRows(workspaceId: string) {
  const [reportRows, analysisRows, fileRows] = await Promise.all([
    db().select({ id: reports.id }).from(reports).where(eq(reports.workspaceId, workspaceId)),
    db().select({ id: analyses.id }).from(analyses).where(eq(analyses.workspaceId, workspaceId)),
    db().select({ id: dataFiles.id }).from(dataFiles).where(eq(dataFiles.workspaceId, workspaceId)),
  ]);
  return { reports: reportRows.length, analyses: analysisRows.length, files: fileRows.length };
}

describe("deleting a report", () => {
  it("removes every version with its comments, keeps the uploads, and records one audit entry", async () => {
    const team = await teamWithTwoVersions();
    actAs(team.owner);
    const result = await deleteReport(team.workspaceId, team.second.reportId, {
      confirmTitle: TITLE,
    });
    expect(result).toEqual({ ok: true, data: { title: TITLE, versions: [1, 2] } });

    expect(await countRows(team.workspaceId)).toEqual({ reports: 0, analyses: 0, files: 2 });
    const comments = await db()
      .select({ id: reviewComments.id })
      .from(reviewComments)
      .where(inArray(reviewComments.reportId, [team.first.reportId, team.second.reportId]));
    expect(comments).toEqual([]);

    const entries = await listAuditEntries(team.workspaceId, { action: "report.deleted" });
    expect(entries).toHaveLength(1);
    expect(entries[0]).toMatchObject({
      actorId: team.owner.id,
      targetType: "report",
      // The lineage is named by its first version's id.
      targetId: team.first.reportId,
      details: { title: TITLE, versions: [1, 2] },
    });
  });

  it("is for owners only, and needs the exact title", async () => {
    const team = await teamWithTwoVersions();
    for (const person of [team.analyst, team.reviewer]) {
      actAs(person);
      expect(
        await deleteReport(team.workspaceId, team.first.reportId, { confirmTitle: TITLE }),
      ).toMatchObject({ ok: false, status: 403 });
    }
    actAs(team.owner);
    const wrongTitle = await deleteReport(team.workspaceId, team.first.reportId, {
      confirmTitle: "Penguins",
    });
    expect(wrongTitle).toMatchObject({ ok: false, status: 422 });
    expect(!wrongTitle.ok && wrongTitle.fieldErrors.confirmTitle).toMatch(/exactly/);
    expect(
      await deleteReport(team.workspaceId, team.first.reportId, { confirmTitle: " " }),
    ).toMatchObject({ ok: false, status: 422 });

    expect((await countRows(team.workspaceId)).reports).toBe(2);
    expect(await listAuditEntries(team.workspaceId, { action: "report.deleted" })).toEqual([]);
  });

  it("cannot reach another workspace's report", async () => {
    const team = await teamWithTwoVersions();
    const other = await createTeam();
    actAs(other.owner);
    expect(
      await deleteReport(other.workspaceId, team.first.reportId, { confirmTitle: TITLE }),
    ).toMatchObject({ ok: false, status: 404 });
    expect(
      await deleteReport(team.workspaceId, team.first.reportId, { confirmTitle: TITLE }),
    ).toMatchObject({ ok: false, status: 404 });
    expect((await countRows(team.workspaceId)).reports).toBe(2);
  });

  it("waits while a re-run of the report is still queued", async () => {
    const team = await teamWithTwoVersions();
    const [{ datasetFileId, parameters }] = await db()
      .select({ datasetFileId: analyses.datasetFileId, parameters: analyses.parameters })
      .from(analyses)
      .where(eq(analyses.workspaceId, team.workspaceId))
      .limit(1);
    await db().insert(analyses).values({
      workspaceId: team.workspaceId,
      title: TITLE,
      datasetFileId,
      parameters,
      previousReportId: team.second.reportId,
      createdBy: team.analyst.id,
    });
    actAs(team.owner);
    const refused = await deleteReport(team.workspaceId, team.first.reportId, {
      confirmTitle: TITLE,
    });
    expect(refused).toMatchObject({ ok: false, status: 409 });
    expect(!refused.ok && refused.message).toMatch(/re-run/);

    await db()
      .update(analyses)
      .set({ status: "cancelled" })
      .where(and(eq(analyses.workspaceId, team.workspaceId), eq(analyses.status, "queued")));
    expect(
      (await deleteReport(team.workspaceId, team.first.reportId, { confirmTitle: TITLE })).ok,
    ).toBe(true);
    expect((await countRows(team.workspaceId)).analyses).toBe(0);
  });
});
