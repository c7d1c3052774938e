// The worker killed while a federated coordinator waits for its clients, under the same supervisor
// and start function that `npm start` uses: the supervisor starts it again, the dead coordinator
// is noticed from its stale heartbeat and its job handed back at once (not after the job's hours
// of expiry), a new coordinator takes the analysis up, and the clients, connecting afterwards,
// finish it with one report equal to the central analysis (penguins from the `vega-datasets` npm
// package, by island, two clients; every summary key to 1e-9 relative, methods.md §9).
// Heartbeat and staleness are shortened (500 ms, 3 s) so the test is quick; the worker and this
// test share a database of their own, so the test services' worker cannot take the job.
import { Readable } from "node:stream";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";

const databaseUrl = vi.hoisted(() => {
  const original = process.env.DATABASE_URL ?? "";
  const url = new URL(original);
  url.pathname = `/partita_coordinator_${crypto.randomUUID().replaceAll("-", "").slice(0, 12)}`;
  process.env.DATABASE_URL = url.toString();
  return { original, private: url.toString() };
});

import { closeDb, db } from "@/db/client";
import { findFederatedClientByName } from "@/db/queries/federated-analyses";
import { findReportSummary } from "@/db/queries/reports";
import { federatedAnalyses, reports } from "@/db/schema";
import { readClientRows, type PartitionSummary } from "@/lib/analysis";
import { runOnlineClient } from "@/lib/cli/digest-online";
import {
  acceptSchemaDigest,
  createFederatedAnalysis,
  getFederatedStatus,
  issueClientKey,
} from "@/lib/federated";
import { stopSendingBoss } from "@/lib/jobs";
import { compareSummaries } from "@/tests/lib/analysis/digests/support";
import { analyzeText } from "@/tests/lib/analysis/support/analyze-text";
import { createPenguinClients, PENGUIN_COLUMNS } from "@/tests/lib/federated/support";
import { createTeam } from "@/tests/support/accounts";
import { createDigestRoutesClient } from "@/tests/support/digest-routes";
import { createMigratedDatabase, dropDatabase } from "@/tests/support/private-database";
import { superviseTestWorker } from "@/tests/support/supervised-test-worker";

const savedEnvironment = { ...process.env };
const testWorker = superviseTestWorker("coordinator-restart");
const { waitFor } = testWorker;
let penguins: Awaited<ReturnType<typeof createPenguinClients>>;

beforeAll(async () => {
  await createMigratedDatabase(databaseUrl.private);
  penguins = await createPenguinClients();
  await testWorker.start();
});

afterAll(async () => {
  await Promise.all([penguins.north.close(), penguins.south.close()]);
  await testWorker.stop();
  await stopSendingBoss();
  await closeDb();
  await dropDatabase(databaseUrl.private);
  process.env = savedEnvironment;
  process.env.DATABASE_URL = databaseUrl.original;
});

/** The coordinator's heartbeat and job as stored. */
async function coordinatorOf(analysisId: string) {
  const [row] = await db()
    .select({ heartbeatAt: federatedAnalyses.heartbeatAt, jobId: federatedAnalyses.jobId })
    .from(federatedAnalyses)
    .where(eq(federatedAnalyses.id, analysisId));
  return row;
}

describe("a worker killed while a federated coordinator waits", () => {
  it("is restarted, the coordinator's job is handed back and taken up, and the clients finish", async () => {
    const team = await createTeam();
    const { analysisId } = await createFederatedAnalysis(team.workspaceId, team.analyst.id, {
      title: "Penguins by island, federated",
      labelColumn: "Species",
      reference: "optimum",
      clients: ["north", "south"],
    });
    const keys: Record<string, string> = {};
    for (const name of ["north", "south"] as const) {
      const client = await findFederatedClientByName(analysisId, name);
      await acceptSchemaDigest(
        { analysisId, client: { id: client!.id, name } },
        await penguins[name].schema(),
      );
      keys[name] = (
        await issueClientKey(team.workspaceId, team.analyst, analysisId, { client: name })
      ).key;
    }
    // Round 1 is in: a coordinator takes the analysis and waits for the fit's first answers.
    const first = await waitFor(
      "the coordinator's first heartbeat",
      async () => {
        const current = await coordinatorOf(analysisId);
        return current?.heartbeatAt ? current : undefined;
      },
      60_000,
    );

    const { killedPid, restartedPid } = await testWorker.killAndAwaitRestart();
    expect(restartedPid).not.toBe(killedPid);
    await waitFor(
      "the lost coordinator's hand-back",
      () =>
        /its coordinator's worker stopped; handed back/.test(testWorker.log()) ? true : undefined,
      60_000,
    );
    // The same job, retried at once by pg-boss on the live worker, holds the analysis again.
    const second = await waitFor(
      "the new coordinator's heartbeat",
      async () => {
        const current = await coordinatorOf(analysisId);
        return current?.heartbeatAt && current.heartbeatAt > first.heartbeatAt!
          ? current
          : undefined;
      },
      90_000,
    );
    expect(second.jobId).toBe(first.jobId);

    // The clients connect now and answer the new coordinator's fit and round 2.
    const reportIds = await Promise.all(
      (["north", "south"] as const).map((name) =>
        runOnlineClient({
          api: createDigestRoutesClient(keys[name]),
          print: () => {},
          log: () => {},
          waitSeconds: 5,
          readRows: (assignment) =>
            readClientRows({
              data: Readable.from([Buffer.from(penguins.texts[name], "utf8")]),
              dataName: `${name}.csv`,
              columns: { ...PENGUIN_COLUMNS, labelColumn: assignment.labelColumn },
            }),
        }),
      ),
    );
    expect(reportIds[0]).toBe(reportIds[1]);
    const status = await getFederatedStatus(team.workspaceId, analysisId);
    expect(status).toMatchObject({ state: "done", reportId: reportIds[0] });
    expect(await coordinatorOf(analysisId)).toMatchObject({ heartbeatAt: null });
    expect(
      await db().select({ id: reports.id }).from(reports).where(eq(reports.id, reportIds[0]!)),
    ).toHaveLength(1);
    const merged = (await findReportSummary(team.workspaceId, reportIds[0]!))!
      .summary as PartitionSummary;
    const central = await analyzeText(penguins.csv, PENGUIN_COLUMNS);
    expect(
      // ‖∇F(W*)‖ is the optimizer's residual, compared with its tolerance.
      compareSummaries(central, merged, false).filter(
        (line) => !line.startsWith(".model.gradNorm"),
      ),
    ).toEqual([]);
    expect(merged.model.gradNorm).toBeLessThanOrEqual(merged.model.optimizer.tolerance);
  }, 300_000);
});
