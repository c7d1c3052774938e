// Storage that stops answering during an analysis: the run waits and retries with backoff,
// the status (and so the progress page) says storage is unreachable, and the run goes on once
// storage answers, or fails with a plain message when the retry window runs out; a run whose job
// expired meanwhile ends failed, never "queued" with no job left to take it. The window is
// shortened to 3 s here (STORAGE_RETRY_WINDOW_MS; half an hour by default). Storage "goes down"
// by pointing the engine thread at a closed port: each attempt starts a thread, which takes the
// process environment as it is at that moment.
import { afterAll, describe, expect, it, vi } from "vitest";
import type { AnalysisJob } from "@/lib/jobs";

const settings = vi.hoisted(() => {
  const working = process.env.S3_ENDPOINT ?? "";
  Object.assign(process.env, { STORAGE_RETRY_WINDOW_MS: "3000", STORAGE_TIMEOUT_MS: "500" });
  return { working };
});
vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));
const queue = vi.hoisted(() => ({ jobs: [] as AnalysisJob[] }));
vi.mock("@/lib/jobs", async (importOriginal) => ({
  ...(await importOriginal<typeof import("@/lib/jobs")>()),
  enqueueAnalysis: async (job: AnalysisJob) => {
    queue.jobs.push(job);
    return `captured-${queue.jobs.length}`;
  },
}));

import { startAnalysis } from "@/app/(workspace)/w/[workspaceId]/analyses/actions";
import { closeDb } from "@/db/client";
import { findAnalysisStatus } from "@/db/queries/analyses";
import { interruptionNotice, toStatusJson } from "@/lib/reports/analysis-status";
import { runAnalysis } from "@/lib/reports/run-analysis";
import { findFreePort } from "@/scripts/services/ports";
import { createTeam } from "@/tests/support/accounts";
import { actAs } from "@/tests/support/fake-session";
import { PENGUIN_OPTIONS, storePenguins } from "@/tests/lib/reports/support/stored-inputs";

afterAll(async () => {
  process.env.S3_ENDPOINT = settings.working;
  await closeDb();
});

async function startPenguinAnalysis() {
  const team = await createTeam();
  const files = await storePenguins({ workspaceId: team.workspaceId, uploadedBy: team.analyst.id });
  actAs(team.analyst);
  const started = await startAnalysis(team.workspaceId, {
    datasetFileId: files.dataset.id,
    layoutFileId: files.layout.id,
    options: PENGUIN_OPTIONS,
  });
  if (!started.ok) throw new Error(started.message);
  return { team, job: queue.jobs.at(-1)!, analysisId: started.data.analysisId };
}

/** Nothing listens there: connections are refused, as from a storage server that is down. */
async function closedEndpoint() {
  return `http://127.0.0.1:${await findFreePort()}`;
}

describe("an analysis while storage is unreachable", () => {
  it("says so, keeps trying, and finishes once storage answers again", async () => {
    const { team, job, analysisId } = await startPenguinAnalysis();
    process.env.S3_ENDPOINT = await closedEndpoint();
    const quiet = vi.spyOn(console, "warn").mockImplementation(() => undefined);
    const run = runAnalysis(job, { willRetry: true });

    let status = await findAnalysisStatus(team.workspaceId, analysisId);
    while (!status?.storageUnreachableSince) {
      await new Promise((resolve) => setTimeout(resolve, 50));
      status = await findAnalysisStatus(team.workspaceId, analysisId);
    }
    expect(status.status).toBe("running");
    expect(interruptionNotice(toStatusJson(status), (iso) => iso)).toMatch(
      /^Storage unreachable since .*, retrying…/,
    );
    process.env.S3_ENDPOINT = settings.working;

    expect((await run).outcome).toBe("succeeded");
    quiet.mockRestore();
    expect(await findAnalysisStatus(team.workspaceId, analysisId)).toMatchObject({
      status: "succeeded",
      storageUnreachableSince: null,
      attempts: 1,
    });
  });

  it("fails with a plain message once the retry window has passed", async () => {
    const { team, job, analysisId } = await startPenguinAnalysis();
    process.env.S3_ENDPOINT = await closedEndpoint();
    const quiet = vi.spyOn(console, "warn").mockImplementation(() => undefined);
    const result = await runAnalysis(job, { willRetry: true });
    quiet.mockRestore();
    process.env.S3_ENDPOINT = settings.working;
    expect(result).toMatchObject({ outcome: "failed", message: /Storage could not be reached/ });
    const status = await findAnalysisStatus(team.workspaceId, analysisId);
    expect(status).toMatchObject({ status: "failed", attempts: 1 });
    expect(status?.failureMessage).toMatch(/Your files are kept/);
  });

  it("fails with a plain message, not queued forever, when its job expired while it waited", async () => {
    const { team, job, analysisId } = await startPenguinAnalysis();
    process.env.S3_ENDPOINT = await closedEndpoint();
    const quiet = vi.spyOn(console, "warn").mockImplementation(() => undefined);
    const workerStopping = new AbortController();
    // The queue gave the job up while the run waited for storage (pg-boss failed it at its
    // expiry and its retry found the run still going); then the worker stops.
    const run = runAnalysis(job, {
      willRetry: true,
      jobStillHeld: async () => false,
      signal: workerStopping.signal,
    });
    let status = await findAnalysisStatus(team.workspaceId, analysisId);
    while (!status?.storageUnreachableSince) {
      await new Promise((resolve) => setTimeout(resolve, 50));
      status = await findAnalysisStatus(team.workspaceId, analysisId);
    }
    workerStopping.abort();
    await expect(run).rejects.toThrow();
    quiet.mockRestore();
    process.env.S3_ENDPOINT = settings.working;
    status = await findAnalysisStatus(team.workspaceId, analysisId);
    expect(status).toMatchObject({ status: "failed", attempts: 1 });
    expect(status?.failureMessage).toMatch(/longer than one attempt may .*Your files are kept/);
  });
});
