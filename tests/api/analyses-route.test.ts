// GET /api/workspaces/[workspaceId]/analyses/[analysisId], called as Next calls it, against the
// real PostgreSQL: every member reads, nobody else does, and no workspace reaches another's.
import { afterAll, describe, expect, it, vi } from "vitest";
import type { AnalysisJob } from "@/lib/jobs";

vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));
vi.mock("@/lib/jobs", async (importOriginal) => ({
  ...(await importOriginal<typeof import("@/lib/jobs")>()),
  // The status is what is read here; no worker needs the job.
  enqueueAnalysis: async (job: AnalysisJob) => `captured-${job.analysisId}`,
}));

import { startAnalysis } from "@/app/(workspace)/w/[workspaceId]/analyses/actions";
import { GET } from "@/app/api/workspaces/[workspaceId]/analyses/[analysisId]/route";
import { closeDb } from "@/db/client";
import { createAccount, createTeam } from "@/tests/support/accounts";
import { actAs } from "@/tests/support/fake-session";
import { PENGUIN_OPTIONS, storePenguins } from "@/tests/lib/reports/support/stored-inputs";

afterAll(closeDb);

async function getStatus(workspaceId: string, analysisId: string) {
  const response = await GET(
    new Request(`http://127.0.0.1/api/workspaces/${workspaceId}/analyses/${analysisId}`),
    { params: Promise.resolve({ workspaceId, analysisId }) },
  );
  return { status: response.status, body: await response.json() };
}

async function teamWithAnalysis() {
  const team = await createTeam();
  const files = await storePenguins({ workspaceId: team.workspaceId, uploadedBy: team.analyst.id });
  actAs(team.analyst);
  const started = await startAnalysis(team.workspaceId, {
    datasetFileId: files.dataset.id,
    layoutFileId: files.layout.id,
    options: PENGUIN_OPTIONS,
  });
  if (!started.ok) throw new Error(started.message);
  return { team, analysisId: started.data.analysisId };
}

describe("the analysis status route", () => {
  it("answers every member of the workspace with the live state", async () => {
    const { team, analysisId } = await teamWithAnalysis();
    for (const role of ["owner", "analyst", "reviewer"] as const) {
      actAs(team[role]);
      const { status, body } = await getStatus(team.workspaceId, analysisId);
      expect(status).toBe(200);
      expect(body).toEqual({
        status: "queued",
        stage: null,
        fraction: 0,
        failureMessage: null,
        attempts: 0,
        simulates: false,
        simulation: null,
        reportId: null,
        title: "penguins.csv · islands.csv",
        workerLostAt: null,
        storageUnreachableSince: null,
        createdAt: expect.stringMatching(/^\d{4}-\d\d-\d\dT/),
        startedAt: null,
        finishedAt: null,
      });
    }
  });

  it("gives 401 signed out, 404 to strangers, and 404 through another workspace", async () => {
    const { team, analysisId } = await teamWithAnalysis();
    actAs(null);
    expect(await getStatus(team.workspaceId, analysisId)).toMatchObject({
      status: 401,
      body: { error: { code: "unauthenticated" } },
    });
    const stranger = await createAccount("stranger");
    actAs(stranger);
    expect(await getStatus(team.workspaceId, analysisId)).toMatchObject({
      status: 404,
      body: { error: { code: "not_found" } },
    });
    // A member of both workspaces still reads an analysis only through its own workspace.
    actAs(team.analyst);
    const elsewhere = await getStatus(team.analyst.workspaceId, analysisId);
    expect(elsewhere).toMatchObject({
      status: 404,
      body: { error: { message: "That analysis does not exist." } },
    });
    expect(JSON.stringify(elsewhere.body)).not.toContain("penguins");
  });
});
