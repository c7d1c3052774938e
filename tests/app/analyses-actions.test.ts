// startAnalysis / cancelAnalysis against the real PostgreSQL and S3 fake: who may call them, and
// what they accept. Jobs are captured instead of sent (the job path has its own tests).
import { Readable } from "node:stream";
import { eq } from "drizzle-orm";
import { afterAll, beforeEach, describe, expect, it, vi } from "vitest";
import type { AnalysisJob } from "@/lib/jobs";

vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));

const queue = vi.hoisted(() => ({ jobs: [] as AnalysisJob[], failNext: false }));
vi.mock("@/lib/jobs", async (importOriginal) => ({
  ...(await importOriginal<typeof import("@/lib/jobs")>()),
  enqueueAnalysis: async (job: AnalysisJob) => {
    if (queue.failNext) {
      queue.failNext = false;
      throw new Error("queue unavailable");
    }
    queue.jobs.push(job);
    return `captured-${queue.jobs.length}`;
  },
}));

import {
  cancelAnalysis,
  estimateSimulation,
  startAnalysis,
} from "@/app/(workspace)/w/[workspaceId]/analyses/actions";
import { closeDb, db } from "@/db/client";
import { findAnalysisStatus } from "@/db/queries/analyses";
import { analyses, dataFiles } from "@/db/schema";
import { analyzePartition } from "@/lib/analysis";
import { runAnalysis } from "@/lib/reports/run-analysis";
import { readCsvHead, summarizeCsvHead } from "@/lib/uploads/csv-preview";
import { createAccount, createTeam } from "@/tests/support/accounts";
import { actAs } from "@/tests/support/fake-session";
import {
  PENGUIN_OPTIONS,
  PENGUINS,
  storeInput,
  storePenguins,
  type StoredInput,
} from "@/tests/lib/reports/support/stored-inputs";

afterAll(closeDb);
beforeEach(() => {
  queue.jobs.length = 0;
  queue.failNext = false;
});

const statusOf = (result: { ok: boolean; status?: number }) => (result.ok ? 200 : result.status);

async function teamWithPenguins() {
  const team = await createTeam();
  const files = await storePenguins({ workspaceId: team.workspaceId, uploadedBy: team.analyst.id });
  const request = {
    datasetFileId: files.dataset.id,
    layoutFileId: files.layout.id,
    options: PENGUIN_OPTIONS,
  };
  return { team, files, request };
}

async function analysesIn(workspaceId: string) {
  return db().select().from(analyses).where(eq(analyses.workspaceId, workspaceId));
}

describe("startAnalysis and cancelAnalysis: who may call them", () => {
  it("lets owners and analysts start and cancel; reviewers get 403", async () => {
    const { team, request } = await teamWithPenguins();
    for (const role of ["owner", "analyst"] as const) {
      actAs(team[role]);
      const started = await startAnalysis(team.workspaceId, request);
      if (!started.ok) throw new Error(started.message);
      expect(statusOf(await cancelAnalysis(team.workspaceId, started.data.analysisId))).toBe(200);
    }
    actAs(team.analyst);
    const started = await startAnalysis(team.workspaceId, request);
    if (!started.ok) throw new Error(started.message);

    actAs(team.reviewer);
    expect(statusOf(await startAnalysis(team.workspaceId, request))).toBe(403);
    expect(statusOf(await cancelAnalysis(team.workspaceId, started.data.analysisId))).toBe(403);
    expect(await findAnalysisStatus(team.workspaceId, started.data.analysisId)).toMatchObject({
      status: "queued",
    });
    expect(await analysesIn(team.workspaceId)).toHaveLength(3);
    expect(queue.jobs).toHaveLength(3);
  });

  it("gives 401 when signed out and 404 in someone else's workspace", async () => {
    const { team, request } = await teamWithPenguins();
    actAs(team.analyst);
    const started = await startAnalysis(team.workspaceId, request);
    if (!started.ok) throw new Error(started.message);

    actAs(null);
    expect(statusOf(await startAnalysis(team.workspaceId, request))).toBe(401);
    expect(statusOf(await cancelAnalysis(team.workspaceId, started.data.analysisId))).toBe(401);
    const stranger = await createAccount("stranger");
    actAs(stranger);
    expect(statusOf(await startAnalysis(team.workspaceId, request))).toBe(404);
    expect(statusOf(await cancelAnalysis(team.workspaceId, started.data.analysisId))).toBe(404);
    // Through their own workspace, the team's analysis does not exist either.
    expect(await cancelAnalysis(stranger.workspaceId, started.data.analysisId)).toMatchObject({
      ok: false,
      status: 404,
    });
    expect(await findAnalysisStatus(team.workspaceId, started.data.analysisId)).toMatchObject({
      status: "queued",
    });
  });
});

describe("startAnalysis: what it accepts", () => {
  it("queues the analysis with a title from the file names, or the one given", async () => {
    const { team, files, request } = await teamWithPenguins();
    actAs(team.analyst);
    const byMap = await startAnalysis(team.workspaceId, request);
    const byColumn = await startAnalysis(team.workspaceId, {
      datasetFileId: files.dataset.id,
      title: "  Islands, by column  ",
      options: { labelColumn: "Species", shardColumn: "Island" },
    });
    const untitledByColumn = await startAnalysis(team.workspaceId, {
      datasetFileId: files.dataset.id,
      options: { labelColumn: "Species", shardColumn: "Island" },
    });
    const ids = [byMap, byColumn, untitledByColumn].map((result) => {
      if (!result.ok) throw new Error(result.message);
      return result.data.analysisId;
    });
    const titles = await Promise.all(
      ids.map(async (id) => (await findAnalysisStatus(team.workspaceId, id))?.title),
    );
    expect(titles).toEqual([
      "penguins.csv · islands.csv",
      "Islands, by column",
      "penguins.csv · Island",
    ]);
    expect(queue.jobs).toEqual(
      ids.map((analysisId) => ({ analysisId, workspaceId: team.workspaceId })),
    );
    const [stored] = await db().select().from(analyses).where(eq(analyses.id, ids[0]));
    expect(stored).toMatchObject({
      status: "queued",
      createdBy: team.analyst.id,
      jobId: "captured-1",
      datasetFileId: files.dataset.id,
      layoutFileId: files.layout.id,
      weightsFileId: null,
      // Stored with the defaults of methods.md filled in.
      parameters: { ...PENGUIN_OPTIONS, lambda: 1e-3, localSteps: 10, rounds: 100, batchSize: 32 },
    });
  });

  it("explains invalid requests on their fields and stores nothing", async () => {
    const { team, files } = await teamWithPenguins();
    actAs(team.analyst);
    const noPartition = await startAnalysis(team.workspaceId, {
      datasetFileId: files.dataset.id,
      options: { labelColumn: "Species" },
    });
    expect(noPartition).toMatchObject({ ok: false, status: 422 });
    expect(!noPartition.ok && noPartition.fieldErrors.layoutFileId).toMatch(/shard column/);

    const badLambda = await startAnalysis(team.workspaceId, {
      datasetFileId: files.dataset.id,
      layoutFileId: files.layout.id,
      options: { ...PENGUIN_OPTIONS, lambda: -1 },
    });
    expect(badLambda).toMatchObject({ ok: false, status: 422 });
    expect(!badLambda.ok && badLambda.fieldErrors["options.lambda"]).toMatch(/λ must be positive/);
    expect(await analysesIn(team.workspaceId)).toEqual([]);
  });

  it("refuses files and reports of another workspace, and files of the wrong kind", async () => {
    const { team, files, request } = await teamWithPenguins();
    const other = await teamWithPenguins();
    actAs(team.analyst);

    const foreignDataset = await startAnalysis(team.workspaceId, {
      ...request,
      datasetFileId: other.files.dataset.id,
    });
    expect(foreignDataset).toMatchObject({ ok: false, status: 422 });
    expect(!foreignDataset.ok && foreignDataset.fieldErrors.datasetFileId).toMatch(
      /not in this workspace/,
    );

    const swapped = await startAnalysis(team.workspaceId, {
      ...request,
      datasetFileId: files.layout.id,
      layoutFileId: files.dataset.id,
    });
    expect(!swapped.ok && swapped.fieldErrors.datasetFileId).toBe(
      "“islands.csv” was uploaded as a partition map, not as a dataset.",
    );

    const weights = await storeInput(
      { workspaceId: team.workspaceId, uploadedBy: team.analyst.id },
      "dataset",
      "weights.json",
      "{}",
    );
    const notWeights = await startAnalysis(team.workspaceId, {
      ...request,
      weightsFileId: weights.id,
    });
    expect(!notWeights.ok && notWeights.fieldErrors.weightsFileId).toMatch(
      /as a dataset, not as reference weights/,
    );

    // A report of the other workspace, made the way every report is made.
    actAs(other.team.analyst);
    const otherStarted = await startAnalysis(other.team.workspaceId, other.request);
    if (!otherStarted.ok) throw new Error(otherStarted.message);
    const otherRun = await runAnalysis(queue.jobs.at(-1)!, { willRetry: true });
    if (otherRun.outcome !== "succeeded") throw new Error(`the other run ${otherRun.outcome}`);
    actAs(team.analyst);
    const foreignReport = await startAnalysis(team.workspaceId, {
      ...request,
      previousReportId: otherRun.reportId,
    });
    expect(!foreignReport.ok && foreignReport.fieldErrors.previousReportId).toBe(
      "The report to revise is not in this workspace.",
    );
    expect(await analysesIn(team.workspaceId)).toEqual([]);
  });

  it("refuses more shards per round than the shards hold, on the plan's field, before queueing", async () => {
    // Open data: the penguins (vega-datasets) live on three islands, Biscoe, Dream and Torgersen.
    const { team, files, request } = await teamWithPenguins();
    actAs(team.analyst);
    const byMap = await startAnalysis(team.workspaceId, {
      ...request,
      options: { ...request.options, participants: 4 },
    });
    expect(byMap).toMatchObject({
      ok: false,
      status: 422,
      fieldErrors: {
        "options.participants":
          'Shards per round (M) is 4, but column "shard" of "islands.csv" names 3 shards: ' +
          "choose at most 3, or let every shard take part.",
      },
    });
    const byColumn = await startAnalysis(team.workspaceId, {
      datasetFileId: files.dataset.id,
      options: { labelColumn: "Species", shardColumn: "Island", participants: 7 },
    });
    expect(byColumn).toMatchObject({ ok: false, status: 422 });
    expect(byColumn.ok ? "" : byColumn.fieldErrors?.["options.participants"]).toMatch(
      /^Shards per round \(M\) is 7, but column "Island" of "penguins.csv" names 3 shards/,
    );
    expect(await analysesIn(team.workspaceId)).toHaveLength(0);

    // As many as there are, or fewer, is a plan the engine can run.
    for (const participants of [3, 2]) {
      const started = await startAnalysis(team.workspaceId, {
        datasetFileId: files.dataset.id,
        options: { labelColumn: "Species", shardColumn: "Island", participants },
      });
      expect(started.ok).toBe(true);
    }
  });

  it("keeps no analysis that could not be queued", async () => {
    const { team, request } = await teamWithPenguins();
    actAs(team.analyst);
    queue.failNext = true;
    const quiet = vi.spyOn(console, "error").mockImplementation(() => undefined);
    try {
      expect(await startAnalysis(team.workspaceId, request)).toMatchObject({
        ok: false,
        status: 500,
      });
    } finally {
      quiet.mockRestore();
    }
    expect(await analysesIn(team.workspaceId)).toEqual([]);
  });
});

/** Gives a stored file the preview registration would have made of its bytes. */
async function addPreview(file: StoredInput) {
  const preview = summarizeCsvHead(
    readCsvHead({ bytes: file.bytes, totalBytes: file.bytes.length, fileName: file.name }),
  );
  await db().update(dataFiles).set({ preview }).where(eq(dataFiles.id, file.id));
}

describe("startAnalysis: the simulation's cost (methods.md §7)", () => {
  it("refuses a plan above the budget on the simulation's field, saying what would fit", async () => {
    const { team, files, request } = await teamWithPenguins();
    await Promise.all([addPreview(files.dataset), addPreview(files.layout)]);
    actAs(team.analyst);
    // 3 × 11 × 10⁶ rounds × 3 islands × 10 × 32 × 8 × 3 ≈ 7.6e11 multiply-adds, above 1e11.
    const options = { ...PENGUIN_OPTIONS, rounds: 1_000_000, simulate: { seeds: 3 } };
    const refused = await startAnalysis(team.workspaceId, { ...request, options });

    // The engine's own refusal for the same input, from calling it directly on the whole file.
    const engineMessage = await analyzePartition({
      data: Readable.from([PENGUINS.csv]),
      partition: Readable.from([PENGUINS.islandMap]),
      options,
    }).then(
      () => "no refusal",
      (error: Error) => error.message,
    );
    expect(engineMessage).toMatch(/^the simulation would take about 7\.60e11 multiply-adds/);
    // The form's words for the same refusal, in the form's number format, naming what on the form
    // brings it within: R ≤ 10⁶ × 10¹¹ / 7.6032×10¹¹ = 131,523.6 (by hand); M = 3 × 0.13 and
    // S = 11 × 0.13 − 8 fit at no value of at least 1, so neither is offered.
    expect(refused).toMatchObject({
      ok: false,
      status: 422,
      fieldErrors: {
        "options.simulate":
          "The simulation would take about 7.6×10¹¹ multiply-adds, above the server's budget of " +
          "1.0×10¹¹. It fits with Rounds (R) at most 131,523.",
      },
    });
    expect(await analysesIn(team.workspaceId)).toEqual([]);
    expect(queue.jobs).toEqual([]);
  });

  it("words the estimate for the form, with the same refusal, to those who may run analyses", async () => {
    const { team, files, request } = await teamWithPenguins();
    await Promise.all([addPreview(files.dataset), addPreview(files.layout)]);
    actAs(team.analyst);
    const simulate = { seeds: 3 };
    const within = await estimateSimulation(team.workspaceId, {
      ...request,
      options: { ...PENGUIN_OPTIONS, simulate },
    });
    // methods.md §7: 3 × (8 + 3) × R = 100 · M = 3 · K = 10 · b = 32 · (d + 1) = 8 · C = 3.
    expect(within).toMatchObject({
      ok: true,
      data: { cost: 3 * 11 * 100 * 3 * 10 * 32 * 8 * 3, amount: "7.6×10⁷", refusal: null },
    });
    const options = { ...PENGUIN_OPTIONS, rounds: 1_000_000, simulate };
    const above = await estimateSimulation(team.workspaceId, { ...request, options });
    const refused = await startAnalysis(team.workspaceId, { ...request, options });
    // The same words as the refusal at queueing (previous test's hand computation: R ≤ 131,523).
    const refusal =
      "The simulation would take about 7.6×10¹¹ multiply-adds, above the server's budget of " +
      "1.0×10¹¹. It fits with Rounds (R) at most 131,523.";
    expect(above).toMatchObject({ ok: true, data: { refusal } });
    expect(refused).toMatchObject({ ok: false, fieldErrors: { "options.simulate": refusal } });
    // Choices that do not tell enough yet give no estimate, and no error.
    expect(
      await estimateSimulation(team.workspaceId, {
        datasetFileId: files.dataset.id,
        options: { labelColumn: "", simulate },
      }),
    ).toEqual({ ok: true, data: null });

    actAs(team.reviewer);
    expect(statusOf(await estimateSimulation(team.workspaceId, request))).toBe(403);
    expect(queue.jobs).toEqual([]);
  });

  it("queues a simulation within the budget and refuses a budget above the server's", async () => {
    const { team, files, request } = await teamWithPenguins();
    await Promise.all([addPreview(files.dataset), addPreview(files.layout)]);
    actAs(team.analyst);
    const tooGenerous = await startAnalysis(team.workspaceId, {
      ...request,
      options: { ...PENGUIN_OPTIONS, simulate: { seeds: 3, budget: 1e12 } },
    });
    expect(!tooGenerous.ok && tooGenerous.fieldErrors["options.simulate.budget"]).toMatch(
      /^The server simulates at most 1e11 multiply-adds/,
    );

    const started = await startAnalysis(team.workspaceId, {
      ...request,
      options: { ...PENGUIN_OPTIONS, simulate: { seeds: 2 } },
    });
    if (!started.ok) throw new Error(started.message);
    const [stored] = await analysesIn(team.workspaceId);
    // Stored with the defaults of analysisOptionsSchema filled in: grid seed 1, budget 1e11.
    expect(stored.parameters.simulate).toEqual({ seeds: 2, seed: 1, budget: 1e11 });
  });
});

describe("cancelAnalysis: what it refuses", () => {
  it("says when there is nothing to cancel", async () => {
    const { team, request } = await teamWithPenguins();
    actAs(team.analyst);
    const started = await startAnalysis(team.workspaceId, request);
    if (!started.ok) throw new Error(started.message);
    const { analysisId } = started.data;
    expect(statusOf(await cancelAnalysis(team.workspaceId, analysisId))).toBe(200);
    expect(await cancelAnalysis(team.workspaceId, analysisId)).toMatchObject({
      ok: false,
      status: 409,
      message: "This analysis was already cancelled.",
    });
    await db().update(analyses).set({ status: "succeeded" }).where(eq(analyses.id, analysisId));
    expect(await cancelAnalysis(team.workspaceId, analysisId)).toMatchObject({
      ok: false,
      status: 409,
      message: "This analysis has already succeeded; there is nothing to cancel.",
    });
    expect(await cancelAnalysis(team.workspaceId, "no-such-analysis")).toMatchObject({
      ok: false,
      status: 404,
    });
  });
});
