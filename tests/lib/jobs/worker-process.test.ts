// The worker as it is deployed: scripts/worker.ts in its own process, taking a job that the start
// action sent through pg-boss in the real PostgreSQL, reading the inputs from the S3 fake. (Under
// `npm test` a second worker shares the queue, as several workers would; either may take the job.)
import { spawn, type ChildProcess } from "node:child_process";
import path from "node:path";
import { eq } from "drizzle-orm";
import PgBoss from "pg-boss";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";

vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));

import { startAnalysis } from "@/app/(workspace)/w/[workspaceId]/analyses/actions";
import { closeDb, db } from "@/db/client";
import { findAnalysisStatus } from "@/db/queries/analyses";
import { analyses, reports } from "@/db/schema";
import { ANALYSIS_QUEUE, stopSendingBoss } from "@/lib/jobs";
import { env } from "@/lib/env";
import { createTeam } from "@/tests/support/accounts";
import { actAs } from "@/tests/support/fake-session";
import { PENGUIN_OPTIONS, storePenguins } from "@/tests/lib/reports/support/stored-inputs";

const projectRoot = path.resolve(import.meta.dirname, "../../..");
let worker: ChildProcess;
let output = "";

/** Resolves once the worker's output matches, or fails with what it printed. */
function waitForOutput(pattern: RegExp, timeoutMs = 60_000): Promise<void> {
  return new Promise((resolve, reject) => {
    const timer = setTimeout(
      () => reject(new Error(`worker never printed ${pattern}:\n${output}`)),
      timeoutMs,
    );
    const check = () => {
      if (!pattern.test(output)) return;
      clearTimeout(timer);
      worker.stdout?.off("data", check);
      resolve();
    };
    worker.stdout?.on("data", check);
    check();
  });
}

beforeAll(async () => {
  worker = spawn(
    process.execPath,
    ["--conditions=react-server", "--import", "tsx", "scripts/worker.ts"],
    { cwd: projectRoot, env: process.env, stdio: ["ignore", "pipe", "pipe"] },
  );
  worker.stdout?.setEncoding("utf8").on("data", (chunk: string) => (output += chunk));
  worker.stderr?.setEncoding("utf8").on("data", (chunk: string) => (output += chunk));
  await waitForOutput(/\[worker\] ready/);
});

afterAll(async () => {
  if (worker.exitCode === null) worker.kill("SIGKILL");
  await stopSendingBoss();
  await closeDb();
});

async function waitForStatus(workspaceId: string, analysisId: string, wanted: string) {
  for (let attempt = 0; attempt < 600; attempt++) {
    const status = await findAnalysisStatus(workspaceId, analysisId);
    if (status?.status === wanted) return status;
    await new Promise((resolve) => setTimeout(resolve, 100));
  }
  throw new Error(`analysis ${analysisId} never became ${wanted}; worker said:\n${output}`);
}

describe("the worker process", () => {
  it("runs a job the start action queued, once", async () => {
    const team = await createTeam();
    const files = await storePenguins({ workspaceId: team.workspaceId, uploadedBy: team.owner.id });
    actAs(team.owner);
    const started = await startAnalysis(team.workspaceId, {
      datasetFileId: files.dataset.id,
      layoutFileId: files.layout.id,
      options: PENGUIN_OPTIONS,
    });
    if (!started.ok) throw new Error(started.message);
    const { analysisId } = started.data;

    const status = await waitForStatus(team.workspaceId, analysisId, "succeeded");
    expect(status.reportId).toEqual(expect.any(String));
    expect(
      await db().select().from(reports).where(eq(reports.analysisId, analysisId)),
    ).toHaveLength(1);

    // pg-boss recorded the job the action sent as completed.
    const [{ jobId }] = await db()
      .select({ jobId: analyses.jobId })
      .from(analyses)
      .where(eq(analyses.id, analysisId));
    const boss = new PgBoss({
      connectionString: env().DATABASE_URL,
      supervise: false,
      schedule: false,
      max: 1,
    });
    await boss.start();
    try {
      for (let attempt = 0; attempt < 100; attempt++) {
        const job = await boss.getJobById(ANALYSIS_QUEUE, jobId!, { includeArchive: true });
        if (job?.state === "completed") break;
        await new Promise((resolve) => setTimeout(resolve, 100));
      }
      const job = await boss.getJobById(ANALYSIS_QUEUE, jobId!, { includeArchive: true });
      expect(job).toMatchObject({ state: "completed", singletonKey: analysisId, retryCount: 0 });
    } finally {
      await boss.stop({ graceful: false });
    }
  });

  it("stops cleanly on SIGTERM", async () => {
    const exited = new Promise<number | null>((resolve) => worker.once("exit", resolve));
    worker.kill("SIGTERM");
    expect(await exited).toBe(0);
    expect(output).toMatch(/SIGTERM: stopping/);
  });
});
