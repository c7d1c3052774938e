// The worker killed in the middle of an analysis, under the same supervisor and start function
// that `npm start` uses: the supervisor starts it again, the dead run is noticed from its stale
// heartbeat and handed back, the status says what happened, and the analysis ends with exactly one
// report. Heartbeat and staleness are shortened (500 ms, 3 s) so the test is quick; the worker
// and this test share a database of their own, so the test services' worker cannot take the job.
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";

const databaseUrl = vi.hoisted(() => {
  const original = process.env.DATABASE_URL ?? "";
  const url = new URL(original);
  url.pathname = `/partita_restart_${crypto.randomUUID().replaceAll("-", "").slice(0, 12)}`;
  process.env.DATABASE_URL = url.toString();
  return { original, private: url.toString() };
});
vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));

import { startAnalysis } from "@/app/(workspace)/w/[workspaceId]/analyses/actions";
import { closeDb, db } from "@/db/client";
import { findAnalysisStatus } from "@/db/queries/analyses";
import { reports } from "@/db/schema";
import { stopSendingBoss } from "@/lib/jobs";
import { interruptionNotice, toStatusJson } from "@/lib/reports/analysis-status";
import { createTeam } from "@/tests/support/accounts";
import { actAs } from "@/tests/support/fake-session";
import { createMigratedDatabase, dropDatabase } from "@/tests/support/private-database";
import { superviseTestWorker } from "@/tests/support/supervised-test-worker";
import { PENGUIN_OPTIONS, storePenguins } from "@/tests/lib/reports/support/stored-inputs";

const savedEnvironment = { ...process.env };
const testWorker = superviseTestWorker("worker-restart");
const { waitFor } = testWorker;

beforeAll(async () => {
  await createMigratedDatabase(databaseUrl.private);
  await testWorker.start();
});

afterAll(async () => {
  await testWorker.stop();
  await stopSendingBoss();
  await closeDb();
  await dropDatabase(databaseUrl.private);
  process.env = savedEnvironment;
  process.env.DATABASE_URL = databaseUrl.original;
});

describe("a worker killed mid-analysis", () => {
  it(
    "is restarted, its run is taken up again and says so, and one report is stored",
    {
      timeout: 180_000,
    },
    async () => {
      const team = await createTeam();
      const files = await storePenguins({
        workspaceId: team.workspaceId,
        uploadedBy: team.owner.id,
      });
      actAs(team.owner);
      // A simulation long enough (a few seconds) to be killed in the middle of.
      const started = await startAnalysis(team.workspaceId, {
        datasetFileId: files.dataset.id,
        layoutFileId: files.layout.id,
        options: { ...PENGUIN_OPTIONS, rounds: 400, simulate: { seeds: 2 } },
      });
      if (!started.ok) throw new Error(started.message);
      const { analysisId } = started.data;
      const status = () => findAnalysisStatus(team.workspaceId, analysisId);

      await waitFor(
        "the simulation's start",
        async () => {
          const current = await status();
          return current?.status === "running" && current.simulationProgress ? current : undefined;
        },
        120_000,
      );
      const killedAt = Date.now();
      const { killedPid, restartedPid } = await testWorker.killAndAwaitRestart();
      expect(restartedPid).not.toBe(killedPid);
      // Noticed within a minute of the kill: queued again, with the reason on the page.
      const handedBack = await waitFor(
        "the lost run's notice",
        async () => {
          const current = await status();
          return current?.workerLostAt ? current : undefined;
        },
        60_000,
      );
      expect(Date.now() - killedAt).toBeLessThan(60_000);
      expect(handedBack.failureMessage).toMatch(/worker running this analysis stopped/);

      // Taken up again: while it runs, the page says the worker stopped and when it restarted.
      const rerun = await waitFor(
        "the second run",
        async () => {
          const current = await status();
          return current && current.attempts === 2 ? current : undefined;
        },
        90_000,
      );
      const notice = interruptionNotice(toStatusJson(rerun), (iso) => iso);
      expect(rerun.status).toBe("running");
      expect(notice).toContain(`noticed at ${rerun.workerLostAt?.toISOString()}`);
      expect(notice).toContain(`restarted at ${rerun.startedAt?.toISOString()}`);

      const finished = await waitFor(
        "the report",
        async () => {
          const current = await status();
          return current?.status === "succeeded" ? current : undefined;
        },
        120_000,
      );
      expect(finished.reportId).toEqual(expect.any(String));
      expect(
        await db()
          .select({ id: reports.id })
          .from(reports)
          .where(eq(reports.analysisId, analysisId)),
      ).toHaveLength(1);
      expect(testWorker.log()).toMatch(/its worker stopped; handed back to the queue/);
    },
  );
});
