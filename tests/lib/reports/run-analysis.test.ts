// The job path end to end against the real PostgreSQL and S3 fake that `npm test` starts: an
// analysis started through the action, run by the job handler in this process (the engine in its
// worker thread), its progress stored, its report stored once. The outside checks: SHA-256 from
// node:crypto over the bytes we uploaded, and the engine called directly on the same bytes.
import { Readable } from "node:stream";
import { and, asc, eq, sql } from "drizzle-orm";
import { afterAll, beforeEach, describe, expect, it, vi } from "vitest";
import type { LiveProgress } from "@/db/queries/analyses";
import type { AnalysisJob } from "@/lib/jobs";

vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));

const queue = vi.hoisted(() => ({ jobs: [] as AnalysisJob[] }));
// Jobs are captured instead of sent, so this process runs each one exactly when the test says.
vi.mock("@/lib/jobs", async (importOriginal) => ({
  ...(await importOriginal<typeof import("@/lib/jobs")>()),
  enqueueAnalysis: async (job: AnalysisJob) => {
    queue.jobs.push(job);
    return `captured-${queue.jobs.length}`;
  },
}));

type ProgressWrite = LiveProgress & { analysisId: string; stillRunning: boolean };
const progressLog = vi.hoisted(() => ({
  writes: [] as ProgressWrite[],
  beforeWrite: undefined as
    ((analysisId: string, progress: LiveProgress) => Promise<void>) | undefined,
}));
// Records every progress value the worker stores, and what the database answered.
vi.mock("@/db/queries/analyses", async (importOriginal) => {
  const actual = await importOriginal<typeof import("@/db/queries/analyses")>();
  return {
    ...actual,
    recordProgress: async (workspaceId: string, analysisId: string, progress: LiveProgress) => {
      await progressLog.beforeWrite?.(analysisId, progress);
      const stillRunning = await actual.recordProgress(workspaceId, analysisId, progress);
      progressLog.writes.push({ analysisId, ...progress, stillRunning });
      return stillRunning;
    },
  };
});

const stored = vi.hoisted(() => ({ analysisIds: [] as string[] }));
// Records which analyses reached the report store, so a test can tell a run stopped before the end.
vi.mock("@/db/queries/report-store", async (importOriginal) => {
  const actual = await importOriginal<typeof import("@/db/queries/report-store")>();
  return {
    ...actual,
    storeReport: async (run: Parameters<typeof actual.storeReport>[0]) => {
      stored.analysisIds.push(run.analysisId);
      return actual.storeReport(run);
    },
  };
});

import { cancelAnalysis, startAnalysis } from "@/app/(workspace)/w/[workspaceId]/analyses/actions";
import { closeDb, db } from "@/db/client";
import {
  claimAnalysis,
  findAnalysisStatus,
  findRunCircumstances,
  recordReadWhole,
  recordRowsSpilled,
} from "@/db/queries/analyses";
import { analyses, dataFiles, reports, reportShards } from "@/db/schema";
import { analyzePartition, type PartitionSummary } from "@/lib/analysis";
import { runAnalysis } from "@/lib/reports/run-analysis";
import { deleteObject } from "@/lib/storage";
import { createTeam } from "@/tests/support/accounts";
import { actAs } from "@/tests/support/fake-session";
import {
  PENGUIN_OPTIONS,
  PENGUINS,
  sha256,
  storeInput,
  storePenguins,
} from "./support/stored-inputs";

afterAll(closeDb);
beforeEach(() => {
  queue.jobs.length = 0;
  progressLog.writes.length = 0;
  progressLog.beforeWrite = undefined;
});

const STAGES = ["reading", "encoding", "fitting", "measuring", "advising"];

/** The engine on the same bytes, called directly: what the stored summary must equal. */
async function analyzeDirectly(options: object, map = PENGUINS.islandMap) {
  const summary = await analyzePartition({
    data: Readable.from([PENGUINS.csv]),
    dataName: "penguins.csv",
    partition: Readable.from([map]),
    partitionName: "islands.csv",
    options: { ...PENGUIN_OPTIONS, ...options },
  });
  // Stored as jsonb: what JSON can say of it.
  return JSON.parse(JSON.stringify(summary)) as PartitionSummary;
}

/** A team with the penguins files, and an analysis of them started by the analyst. */
async function startPenguinAnalysis(extra: Record<string, unknown> = {}) {
  const team = await createTeam();
  const files = await storePenguins({
    workspaceId: team.workspaceId,
    uploadedBy: team.analyst.id,
  });
  actAs(team.analyst);
  const started = await startAnalysis(team.workspaceId, {
    datasetFileId: files.dataset.id,
    layoutFileId: files.layout.id,
    options: PENGUIN_OPTIONS,
    ...extra,
  });
  if (!started.ok) throw new Error(`startAnalysis failed: ${started.message}`);
  const job = queue.jobs.at(-1)!;
  return { team, files, job, analysisId: started.data.analysisId };
}

async function reportsOf(analysisId: string) {
  return db().select().from(reports).where(eq(reports.analysisId, analysisId));
}

describe("running an analysis job", () => {
  it("goes queued → running → succeeded, storing progress, checksums, summary and shards", async () => {
    const { team, files, job, analysisId } = await startPenguinAnalysis();
    expect(job).toEqual({ analysisId, workspaceId: team.workspaceId });
    expect(await findAnalysisStatus(team.workspaceId, analysisId)).toMatchObject({
      status: "queued",
      attempts: 0,
      title: "penguins.csv · islands.csv",
      reportId: null,
    });

    const result = await runAnalysis(job, { willRetry: true, progressIntervalMs: 0 });
    expect(result.outcome).toBe("succeeded");

    // Every stored value was written while the analysis was running, in stage order, each
    // fraction within [0, 1] and never going back within a stage; the run saw all five stages.
    const writes = progressLog.writes.filter((write) => write.analysisId === analysisId);
    expect(writes.every((write) => write.stillRunning)).toBe(true);
    const positions = writes.map((write) => STAGES.indexOf(write.stage) + write.fraction);
    expect(positions.every((position, i) => i === 0 || position >= positions[i - 1])).toBe(true);
    expect(writes.every((write) => write.fraction >= 0 && write.fraction <= 1)).toBe(true);
    expect(writes[0].stage).toBe("reading");
    expect(new Set(writes.map((write) => write.stage)).size).toBeGreaterThanOrEqual(3);

    const status = await findAnalysisStatus(team.workspaceId, analysisId);
    expect(status).toMatchObject({ status: "succeeded", attempts: 1, fraction: 1 });
    expect(status?.startedAt).toBeInstanceOf(Date);
    expect(status?.finishedAt).toBeInstanceOf(Date);
    expect(status?.reportId).toBe(result.outcome === "succeeded" && result.reportId);

    const [report] = await reportsOf(analysisId);
    expect(report).toMatchObject({
      workspaceId: team.workspaceId,
      lineageId: report.id,
      version: 1,
      previousReportId: null,
      title: "penguins.csv · islands.csv",
      authorId: team.analyst.id,
    });
    // Outside check: node:crypto's SHA-256 of the bytes we uploaded.
    expect(report.inputs).toEqual([
      {
        kind: "dataset",
        name: "penguins.csv",
        objectKey: files.dataset.objectKey,
        sizeBytes: files.dataset.bytes.length,
        sha256: sha256(PENGUINS.csv),
      },
      {
        kind: "layout",
        name: "islands.csv",
        objectKey: files.layout.objectKey,
        sizeBytes: files.layout.bytes.length,
        sha256: sha256(PENGUINS.islandMap),
      },
    ]);
    const direct = await analyzeDirectly({});
    expect(report.summary).toEqual(direct);
    expect(report.summaryHeader).toEqual({ ...direct, shards: [] });
    expect(report.verdict).toBe(direct.advice.verdict);
    expect(report.engineVersion).toBe(direct.engineVersion);
    expect(report.parameters).toMatchObject(PENGUIN_OPTIONS);
    expect(report.timings.total).toBeGreaterThan(0);
    expect(Object.keys(report.timings)).toEqual(expect.arrayContaining([...STAGES, "total"]));

    const shards = await db()
      .select()
      .from(reportShards)
      .where(eq(reportShards.reportId, report.id))
      .orderBy(asc(reportShards.ordinal));
    expect(shards.map((shard) => shard.shardId)).toEqual(["Biscoe", "Dream", "Torgersen"]);
    shards.forEach((shard, ordinal) => {
      const { id, ...measures } = direct.shards[ordinal];
      expect(shard).toEqual({ reportId: report.id, ordinal, shardId: id, ...measures });
      // Identity: a shard's label counts add up to its rows.
      expect(shard.labelCounts.reduce((sum, count) => sum + count, 0)).toBe(shard.rows);
    });
  });

  it("forgets an earlier attempt's circumstances: the report names only its own run's", async () => {
    const { team, job, analysisId } = await startPenguinAnalysis();
    // An earlier attempt, shared among workers, spilled its rows and was read whole; this worker
    // runs the retry in one process, in memory.
    await recordRowsSpilled(team.workspaceId, analysisId, 1024 * 1024);
    await recordReadWhole(team.workspaceId, analysisId, "the file is gzip-compressed");
    expect(await runAnalysis(job, { willRetry: false })).toMatchObject({ outcome: "succeeded" });
    expect(await findRunCircumstances(team.workspaceId, analysisId)).toEqual({
      rowsSpilledAtLimit: null,
      readWholeBecause: null,
    });
  });

  it("stores one report however often the job runs, even two runs at once", async () => {
    const { team, job, analysisId } = await startPenguinAnalysis();
    // A worker took the job and is running it: a duplicate of its job leaves it alone.
    expect(await claimAnalysis(team.workspaceId, analysisId, 30_000)).toBeDefined();
    expect(await runAnalysis(job, { willRetry: true })).toEqual({ outcome: "skipped" });
    // Then it died: its heartbeat stops, and two runs of the retried job race for it.
    await db()
      .update(analyses)
      .set({ heartbeatAt: sql`now() - interval '1 hour'` })
      .where(eq(analyses.id, analysisId));
    const [first, second] = await Promise.all([
      runAnalysis(job, { willRetry: true }),
      runAnalysis(job, { willRetry: true }),
    ]);
    expect([first.outcome, second.outcome].sort()).toEqual(["skipped", "succeeded"]);
    expect(await runAnalysis(job, { willRetry: true })).toEqual({ outcome: "skipped" });
    expect(await reportsOf(analysisId)).toHaveLength(1);
    expect(await findAnalysisStatus(team.workspaceId, analysisId)).toMatchObject({
      status: "succeeded",
      attempts: 2,
    });
  });

  it("continues a report's lineage when a run revises it", async () => {
    const { team, files, job } = await startPenguinAnalysis();
    const original = await runAnalysis(job, { willRetry: true });
    if (original.outcome !== "succeeded") throw new Error("the first run did not succeed");
    const revise = async (previousReportId: string, lambda: number) => {
      const started = await startAnalysis(team.workspaceId, {
        datasetFileId: files.dataset.id,
        layoutFileId: files.layout.id,
        previousReportId,
        options: { ...PENGUIN_OPTIONS, lambda },
      });
      if (!started.ok) throw new Error(started.message);
      const run = await runAnalysis(queue.jobs.at(-1)!, { willRetry: true });
      if (run.outcome !== "succeeded") throw new Error("a revision did not succeed");
      const [report] = await reportsOf(started.data.analysisId);
      return report;
    };
    const second = await revise(original.reportId, 1e-2);
    // Revising version 1 again does not reuse version 2.
    const third = await revise(original.reportId, 1e-1);
    expect(
      [second, third].map(({ lineageId, version, previousReportId }) => ({
        lineageId,
        version,
        previousReportId,
      })),
    ).toEqual([
      { lineageId: original.reportId, version: 2, previousReportId: original.reportId },
      { lineageId: original.reportId, version: 3, previousReportId: original.reportId },
    ]);
    expect(second.parameters.lambda).toBe(1e-2);
    expect(second.summary.model.lambda).toBe(1e-2);
  });

  it("fails with the engine's message naming the file, keeping the inputs, for a bad map", async () => {
    const team = await createTeam();
    const workspace = { workspaceId: team.workspaceId, uploadedBy: team.analyst.id };
    const dataset = await storeInput(workspace, "dataset", "penguins.csv", PENGUINS.csv);
    const layout = await storeInput(
      workspace,
      "layout",
      "islands.csv",
      `${PENGUINS.islandMap}9999,Biscoe\n`,
    );
    const filesBefore = await db()
      .select()
      .from(dataFiles)
      .where(eq(dataFiles.workspaceId, team.workspaceId));
    actAs(team.analyst);
    const started = await startAnalysis(team.workspaceId, {
      datasetFileId: dataset.id,
      layoutFileId: layout.id,
      options: PENGUIN_OPTIONS,
    });
    if (!started.ok) throw new Error(started.message);
    const result = await runAnalysis(queue.jobs[0], { willRetry: true });

    // The engine's own message for this input, from calling it directly.
    const expected = await analyzeDirectly({}, `${PENGUINS.islandMap}9999,Biscoe\n`).then(
      () => "no error",
      (error: Error) => error.message,
    );
    expect(expected).toMatch(/^islands\.csv, column "row_id": .*"9999"/);
    expect(result).toEqual({ outcome: "failed", message: expected });
    expect(await findAnalysisStatus(team.workspaceId, started.data.analysisId)).toMatchObject({
      status: "failed",
      failureMessage: expected,
      attempts: 1,
    });
    expect(await reportsOf(started.data.analysisId)).toEqual([]);
    expect(
      await db().select().from(dataFiles).where(eq(dataFiles.workspaceId, team.workspaceId)),
    ).toEqual(filesBefore);
  });

  it("uses uploaded reference weights, and names a weights file that is not valid", async () => {
    const direct = await analyzeDirectly({});
    const { team, files } = await startPenguinAnalysis();
    const workspace = { workspaceId: team.workspaceId, uploadedBy: team.analyst.id };
    // The optimum a report publishes is, by methods.md §2, a valid reference point.
    const weightsText = JSON.stringify(direct.model.optimum);
    const weights = await storeInput(workspace, "weights", "optimum.json", weightsText);
    const broken = await storeInput(workspace, "weights", "broken.json", '{"classes": null}');
    const startWith = async (weightsFileId: string) => {
      const started = await startAnalysis(team.workspaceId, {
        datasetFileId: files.dataset.id,
        layoutFileId: files.layout.id,
        weightsFileId,
        options: PENGUIN_OPTIONS,
      });
      if (!started.ok) throw new Error(started.message);
      return runAnalysis(queue.jobs.at(-1)!, { willRetry: true });
    };

    const good = await startWith(weights.id);
    if (good.outcome !== "succeeded") throw new Error(`the weights run ${good.outcome}`);
    const [report] = await db().select().from(reports).where(eq(reports.id, good.reportId));
    expect(report.summary.model.reference).toBe("given");
    expect(report.inputs.map((input) => [input.kind, input.sha256])).toEqual([
      ["dataset", sha256(PENGUINS.csv)],
      ["layout", sha256(PENGUINS.islandMap)],
      ["weights", sha256(weightsText)],
    ]);
    // At the optimum itself, the given point gives the optimum's loss (to rounding in JSON).
    expect(report.summary.model.loss).toBeCloseTo(direct.model.loss, 10);

    const bad = await startWith(broken.id);
    expect(bad.outcome).toBe("failed");
    expect(bad.outcome === "failed" && bad.message).toMatch(/^broken\.json: features: /);
  });

  it("stops a running analysis when it is cancelled, and stores nothing", async () => {
    const { team, job, analysisId } = await startPenguinAnalysis();
    let cancelledAt: number | undefined;
    progressLog.beforeWrite = async () => {
      if (cancelledAt !== undefined) return;
      cancelledAt = progressLog.writes.length;
      actAs(team.analyst);
      expect(await cancelAnalysis(team.workspaceId, analysisId)).toEqual({
        ok: true,
        data: undefined,
      });
    };
    const result = await runAnalysis(job, { willRetry: true, progressIntervalMs: 0 });
    expect(result).toEqual({ outcome: "cancelled" });
    // The write that met the cancellation was refused, and none followed it.
    expect(progressLog.writes.slice(cancelledAt)).toEqual([
      expect.objectContaining({ stillRunning: false }),
    ]);
    expect(await findAnalysisStatus(team.workspaceId, analysisId)).toMatchObject({
      status: "cancelled",
      reportId: null,
    });
    expect(await reportsOf(analysisId)).toEqual([]);
  });

  it("stores the simulation's progress by run and round, then its summary", async () => {
    const simulate = { seeds: 1 };
    const { team, job, analysisId } = await startPenguinAnalysis({
      options: { ...PENGUIN_OPTIONS, rounds: 5, simulate },
    });
    const result = await runAnalysis(job, { willRetry: true, progressIntervalMs: 0 });
    expect(result.outcome).toBe("succeeded");

    const writes = progressLog.writes.filter((write) => write.analysisId === analysisId);
    const simulation = writes.flatMap((write) => (write.simulation ? [write.simulation] : []));
    // methods.md §7: 3 algorithms × (8 step sizes + 3 places to extend the grid + S = 1 seed) runs of
    // R = 5 rounds each, in
    // order minibatch, local, drift-corrected; the engine's five stages came first.
    expect(simulation.length).toBeGreaterThan(0);
    const firstSimulated = writes.findIndex((write) => write.simulation !== null);
    expect(writes.slice(firstSimulated).every((write) => write.stage === "advising")).toBe(true);
    expect(simulation.every((step) => step.runs === 36 && step.rounds === 5)).toBe(true);
    const order = ["minibatch", "local", "scaffold"];
    simulation.forEach((step, index) => {
      expect(order[Math.floor((step.run - 1) / 12)]).toBe(step.algorithm);
      if (index > 0) expect(step.fraction).toBeGreaterThanOrEqual(simulation[index - 1].fraction);
    });

    const status = await findAnalysisStatus(team.workspaceId, analysisId);
    expect(status).toMatchObject({ status: "succeeded", simulates: true });
    const [report] = await reportsOf(analysisId);
    // Deterministic (methods.md §7): the engine called directly gives the same simulation.
    const direct = await analyzeDirectly({ rounds: 5, simulate });
    expect(report.summary.simulation).toEqual(direct.simulation);
  });

  it("stops a simulation in the middle when the analysis is cancelled", async () => {
    // About 1.5e9 multiply-adds (3 × 11 × 2000 rounds × 3 islands × 10 × 32 × 8 × 3): many
    // seconds of simulation, so a run that ignored the cancellation would reach the report store.
    const { team, job, analysisId } = await startPenguinAnalysis({
      options: { ...PENGUIN_OPTIONS, rounds: 2000, simulate: { seeds: 3 } },
    });
    let cancelledAt: LiveProgress["simulation"] | undefined;
    progressLog.beforeWrite = async (_analysisId, progress) => {
      if (cancelledAt !== undefined || progress.simulation === null) return;
      cancelledAt = progress.simulation;
      actAs(team.analyst);
      expect((await cancelAnalysis(team.workspaceId, analysisId)).ok).toBe(true);
    };
    const result = await runAnalysis(job, { willRetry: true, progressIntervalMs: 0 });
    expect(result).toEqual({ outcome: "cancelled" });
    expect(cancelledAt).toMatchObject({ algorithm: "minibatch", runs: 42, rounds: 2000 });
    // The engine thread was stopped: the run never finished, so nothing reached the store.
    expect(stored.analysisIds).not.toContain(analysisId);
    expect(await findAnalysisStatus(team.workspaceId, analysisId)).toMatchObject({
      status: "cancelled",
      reportId: null,
    });
  });

  it("does nothing for a job whose analysis was cancelled before it started", async () => {
    const { team, job, analysisId } = await startPenguinAnalysis();
    expect((await cancelAnalysis(team.workspaceId, analysisId)).ok).toBe(true);
    expect(await runAnalysis(job, { willRetry: true })).toEqual({ outcome: "skipped" });
    expect(await findAnalysisStatus(team.workspaceId, analysisId)).toMatchObject({
      status: "cancelled",
      attempts: 0,
    });
  });

  it("hands an internal failure back for a retry, and fails for good on the last attempt", async () => {
    const { team, files, job, analysisId } = await startPenguinAnalysis();
    // The object vanished from storage: not the user's input, so no engine message applies.
    await deleteObject(files.dataset.objectKey);
    const quiet = vi.spyOn(console, "error").mockImplementation(() => undefined);
    try {
      await expect(runAnalysis(job, { willRetry: true })).rejects.toThrow();
      expect(await findAnalysisStatus(team.workspaceId, analysisId)).toMatchObject({
        status: "queued",
        attempts: 1,
        failureMessage: expect.stringMatching(/will be tried again/),
      });
      await expect(runAnalysis(job, { willRetry: false })).rejects.toThrow();
      expect(quiet).toHaveBeenCalled();
    } finally {
      quiet.mockRestore();
    }
    const status = await findAnalysisStatus(team.workspaceId, analysisId);
    expect(status).toMatchObject({ status: "failed", attempts: 2, reportId: null });
    expect(status?.failureMessage).toMatch(/internal error, not because of your files/);
    // The user never sees storage details.
    expect(status?.failureMessage).not.toMatch(/NoSuchKey|workspaces\//);
    const kept = await db()
      .select()
      .from(dataFiles)
      .where(and(eq(dataFiles.workspaceId, team.workspaceId), eq(dataFiles.id, files.dataset.id)));
    expect(kept).toHaveLength(1);
  });
});
