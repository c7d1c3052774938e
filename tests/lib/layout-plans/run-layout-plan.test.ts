// A layout plan as background work, end to end against the real PostgreSQL and S3 fake that
// `npm test` starts: queued through the action, run by the job's runner in this process (the
// planner in its worker thread), candidates stored one by one. The outside check is methods.md §8's
// read-back: every stored map, analysed by the engine directly, gives the stored summary.
import { buffer } from "node:stream/consumers";
import { Readable } from "node:stream";
import { afterAll, beforeEach, describe, expect, it, vi } from "vitest";
import type { LayoutPlanJob } from "@/lib/jobs";

vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));

const queue = vi.hoisted(() => ({ jobs: [] as LayoutPlanJob[] }));
// Jobs are captured instead of sent, so this process runs each one exactly when the test says.
vi.mock("@/lib/jobs", async (importOriginal) => ({
  ...(await importOriginal<typeof import("@/lib/jobs")>()),
  enqueueLayoutPlan: async (job: LayoutPlanJob) => {
    queue.jobs.push(job);
    return `captured-${queue.jobs.length}`;
  },
}));

const candidateHook = vi.hoisted(() => ({
  afterEnd: undefined as ((planId: string, ordinal: number) => Promise<void>) | undefined,
  /** Every candidate write: plan and ordinal. */
  writes: [] as { planId: string; ordinal: number }[],
}));
// Lets a test act (cancel) right after a candidate's end was stored, and see which candidates a
// run writes.
vi.mock("@/db/queries/layout-plans", async (importOriginal) => {
  const actual = await importOriginal<typeof import("@/db/queries/layout-plans")>();
  return {
    ...actual,
    updateLayoutCandidate: async (...args: Parameters<typeof actual.updateLayoutCandidate>) => {
      candidateHook.writes.push({ planId: args[1], ordinal: args[2] });
      await actual.updateLayoutCandidate(...args);
      if (args[3].finished) await candidateHook.afterEnd?.(args[1], args[2]);
    },
  };
});

import {
  analyseCandidate,
  cancelPlan,
  startLayoutPlan,
} from "@/app/(workspace)/w/[workspaceId]/layouts/actions";
import { eq, sql, type SQL } from "drizzle-orm";
import { closeDb, db } from "@/db/client";
import { layoutPlans } from "@/db/schema";
import { createHash } from "node:crypto";
import { deleteDataFile } from "@/app/(workspace)/w/[workspaceId]/analyses/new/actions";
import { findInputFiles } from "@/db/queries/analyses";
import { listDataFiles } from "@/db/queries/data-files";
import { findLayoutPlan, handBackLostPlans } from "@/db/queries/layout-plans";
import { analyzePartition, type PartitionSummary } from "@/lib/analysis";
import { runLayoutPlan } from "@/lib/layout-plans/run-layout-plan";
import { getObjectStream } from "@/lib/storage";
import type { LayoutPlanInput } from "@/lib/validation/layout-plan";
import { createTeam } from "@/tests/support/accounts";
import { actAs } from "@/tests/support/fake-session";
import { PENGUIN_OPTIONS, PENGUINS, storePenguins } from "../reports/support/stored-inputs";

afterAll(closeDb);
beforeEach(() => {
  queue.jobs.length = 0;
  candidateHook.afterEnd = undefined;
  candidateHook.writes.length = 0;
});

/** β = 10⁻⁴ over 3 shards leaves a shard empty in every one of the 100 draws (methods.md §8). */
const FAILING_QUANTITY = { generator: "quantity", beta: 1e-4 } as const;

async function planPenguins(overrides: Partial<LayoutPlanInput> = {}) {
  const team = await createTeam();
  const { dataset } = await storePenguins({
    workspaceId: team.workspaceId,
    uploadedBy: team.analyst.id,
  });
  actAs(team.analyst);
  const started = await startLayoutPlan(team.workspaceId, {
    title: "Penguin layouts",
    datasetFileId: dataset.id,
    options: PENGUIN_OPTIONS,
    shardCount: 3,
    generators: [
      { generator: "iid" },
      FAILING_QUANTITY,
      { generator: "stratified" },
      { generator: "classes", k: 2 },
    ],
    seed: 7,
    ...overrides,
  });
  if (!started.ok) throw new Error(`startLayoutPlan failed: ${started.message}`);
  return { team, planId: started.data.planId, job: queue.jobs.at(-1)! };
}

async function readObject(key: string): Promise<string> {
  return (await buffer((await getObjectStream(key)).body)).toString("utf8");
}

describe("running a layout plan job", () => {
  it("scores every candidate, records the failed one, and stores maps that read back to the summaries", async () => {
    const { team, planId, job } = await planPenguins();
    expect((await findLayoutPlan(team.workspaceId, planId))?.status).toBe("queued");

    const outcome = await runLayoutPlan(job, { willRetry: false, progressIntervalMs: 0 });
    expect(outcome).toEqual({ outcome: "succeeded", scored: 3, failed: 1 });

    const plan = (await findLayoutPlan(team.workspaceId, planId))!;
    expect(plan.status).toBe("succeeded");
    expect(plan.seed).toBe(7);
    expect(plan.candidates.map((candidate) => [candidate.name, candidate.status])).toEqual([
      ["iid", "succeeded"],
      ["quantity-0.0001", "failed"],
      ["stratified", "succeeded"],
      ["classes-2", "succeeded"],
    ]);
    expect(plan.candidates[1].failureMessage).toMatch(/empty|row/i);
    for (const candidate of plan.candidates.filter((row) => row.status === "succeeded")) {
      expect(candidate.fraction).toBe(1);
      const map = await readObject(candidate.mapObjectKey!);
      expect(map.startsWith("row_id,shard\n")).toBe(true);
      // methods.md §8: the analysis given the exported map reaches the summary the plan stored.
      const direct = await analyzePartition({
        data: Readable.from([PENGUINS.csv]),
        dataName: "penguins.csv",
        partition: Readable.from([map]),
        options: PENGUIN_OPTIONS,
        threads: 1,
      });
      expect(candidate.summary, candidate.name).toEqual(
        JSON.parse(JSON.stringify(direct)) as PartitionSummary,
      );
    }
  }, 120_000);

  it("registers a candidate's map once as a layout file, as an upload is, for analysts only and in its workspace", async () => {
    const { team, planId, job } = await planPenguins({ generators: [{ generator: "iid" }] });
    await runLayoutPlan(job, { willRetry: false });

    const first = await analyseCandidate(team.workspaceId, planId, 0);
    const again = await analyseCandidate(team.workspaceId, planId, 0);
    expect(first.ok && again.ok && first.data.layoutFileId === again.data.layoutFileId).toBe(true);
    const fileId = (first as { data: { layoutFileId: string } }).data.layoutFileId;
    const [file] = await findInputFiles(team.workspaceId, [fileId]);
    expect(file).toMatchObject({ kind: "layout", name: "iid.csv" });
    // Registered as an upload: its own object, the SHA-256 of its bytes (node:crypto), a preview.
    const candidate = (await findLayoutPlan(team.workspaceId, planId))!.candidates[0];
    expect(file.objectKey).not.toBe(candidate.mapObjectKey);
    const map = await readObject(candidate.mapObjectKey!);
    expect(await readObject(file.objectKey)).toBe(map);
    expect(file.sha256).toBe(createHash("sha256").update(map).digest("hex"));
    const [listed] = await listDataFiles(team.workspaceId, "layout");
    expect(listed.id).toBe(fileId);
    expect(listed.preview?.columns.map((column) => column.name)).toEqual(["row_id", "shard"]);

    // The same layout from a second plan (same generator and seed: the same bytes) is the same
    // file, as a repeated upload is, and that plan's own map stays downloadable.
    const started = await startLayoutPlan(team.workspaceId, {
      title: "Penguin layouts again",
      datasetFileId: (await findLayoutPlan(team.workspaceId, planId))!.datasetFileId,
      options: PENGUIN_OPTIONS,
      shardCount: 3,
      generators: [{ generator: "iid" }],
      seed: 7,
    });
    if (!started.ok) throw new Error(`startLayoutPlan failed: ${started.message}`);
    await runLayoutPlan(queue.jobs.at(-1)!, { willRetry: false });
    const repeated = await analyseCandidate(team.workspaceId, started.data.planId, 0);
    expect(repeated).toEqual(first);
    const secondMapKey = (await findLayoutPlan(team.workspaceId, started.data.planId))!
      .candidates[0].mapObjectKey!;
    expect(await readObject(secondMapKey)).toBe(map);

    actAs(team.reviewer);
    expect(await analyseCandidate(team.workspaceId, planId, 0)).toMatchObject({ status: 403 });
    const other = await createTeam();
    actAs(other.owner);
    expect(await analyseCandidate(other.workspaceId, planId, 0)).toMatchObject({ status: 404 });
  }, 120_000);

  it("refuses to delete a plan's dataset with a clear 409, and lets a candidate's registered map go", async () => {
    const { team, planId, job } = await planPenguins({ generators: [{ generator: "iid" }] });
    await runLayoutPlan(job, { willRetry: false });
    const plan = (await findLayoutPlan(team.workspaceId, planId))!;
    expect(await deleteDataFile(team.workspaceId, plan.datasetFileId)).toMatchObject({
      ok: false,
      status: 409,
      message: '"penguins.csv" is the dataset of a layout plan; it stays while the plan does.',
    });
    expect((await findInputFiles(team.workspaceId, [plan.datasetFileId])).length).toBe(1);

    // The registered map is a copy: deleting it clears the candidate's link, keeps its own map,
    // and analysing the candidate again registers a new file.
    const first = await analyseCandidate(team.workspaceId, planId, 0);
    if (!first.ok) throw new Error(first.message);
    expect(await deleteDataFile(team.workspaceId, first.data.layoutFileId)).toEqual({
      ok: true,
      data: undefined,
    });
    const candidate = (await findLayoutPlan(team.workspaceId, planId))!.candidates[0];
    expect(candidate.mapFileId).toBeNull();
    expect((await readObject(candidate.mapObjectKey!)).startsWith("row_id,shard\n")).toBe(true);
    const again = await analyseCandidate(team.workspaceId, planId, 0);
    expect(again.ok && again.data.layoutFileId !== first.data.layoutFileId).toBe(true);
  }, 120_000);

  it("stops when cancelled, keeping the candidates already scored", async () => {
    const { team, planId, job } = await planPenguins({
      generators: [
        { generator: "iid" },
        { generator: "stratified" },
        { generator: "classes", k: 2 },
      ],
    });
    candidateHook.afterEnd = async (id, ordinal) => {
      if (id === planId && ordinal === 0) await cancelPlan(team.workspaceId, planId);
    };
    const outcome = await runLayoutPlan(job, { willRetry: false, heartbeatMs: 20 });
    expect(outcome).toEqual({ outcome: "cancelled" });
    const plan = (await findLayoutPlan(team.workspaceId, planId))!;
    expect(plan.status).toBe("cancelled");
    expect(plan.candidates.map((candidate) => candidate.status)).toEqual([
      "succeeded",
      "cancelled",
      "cancelled",
    ]);
  }, 120_000);

  it("a retried job after its worker died scores only the candidates that had not finished", async () => {
    const { team, planId, job } = await planPenguins({
      generators: [
        { generator: "iid" },
        { generator: "stratified" },
        { generator: "classes", k: 2 },
      ],
    });
    // The worker dies right after the first candidate's end was stored: the plan stays running,
    // nobody hands it back to the queue.
    const died = new AbortController();
    candidateHook.afterEnd = async (id, ordinal) => {
      if (id === planId && ordinal === 0) died.abort(new Error("worker died"));
    };
    await expect(runLayoutPlan(job, { willRetry: true, signal: died.signal })).rejects.toThrow(
      "worker died",
    );
    const leftRunning = (heartbeatAt: SQL) =>
      db()
        .update(layoutPlans)
        .set({ status: "running", heartbeatAt })
        .where(eq(layoutPlans.id, planId));
    await leftRunning(sql`now()`);
    const before = (await findLayoutPlan(team.workspaceId, planId))!;
    expect(before.candidates[0].status).toBe("succeeded");
    for (const candidate of before.candidates.slice(1)) {
      expect(["queued", "running"]).toContain(candidate.status);
    }
    candidateHook.afterEnd = undefined;

    // A second delivery of the job while the first run's heartbeat is fresh does not take it.
    expect(await runLayoutPlan(job, { willRetry: true })).toEqual({ outcome: "skipped" });
    // Its heartbeat goes stale: the workers' sweep hands the plan back to the queue.
    await leftRunning(sql`now() - interval '1 hour'`);
    expect(await handBackLostPlans(30_000)).toEqual([
      expect.objectContaining({ planId, workspaceId: team.workspaceId }),
    ]);
    expect(await handBackLostPlans(30_000)).toEqual([]);

    candidateHook.writes.length = 0;
    const outcome = await runLayoutPlan(job, { willRetry: false });
    expect(outcome).toEqual({ outcome: "succeeded", scored: 2, failed: 0 });
    const written = candidateHook.writes.filter((write) => write.planId === planId);
    expect(written.map((write) => write.ordinal)).not.toContain(0);
    expect(new Set(written.map((write) => write.ordinal))).toEqual(new Set([1, 2]));
    const after = (await findLayoutPlan(team.workspaceId, planId))!;
    expect(after.status).toBe("succeeded");
    expect(after.candidates.map((candidate) => candidate.status)).toEqual([
      "succeeded",
      "succeeded",
      "succeeded",
    ]);
    // The first candidate is the one the first run stored: same map object, same finish time.
    expect(after.candidates[0].mapObjectKey).toBe(before.candidates[0].mapObjectKey);
    expect(after.candidates[0].finishedAt).toEqual(before.candidates[0].finishedAt);
    expect(after.candidates[0].summary).toEqual(before.candidates[0].summary);
  }, 120_000);

  it("fails the whole plan with the engine's message when the group column does not exist", async () => {
    const { team, planId, job } = await planPenguins({
      groupColumn: "nest",
      generators: [{ generator: "group-hash" }],
    });
    const outcome = await runLayoutPlan(job, { willRetry: false });
    expect(outcome).toMatchObject({ outcome: "failed" });
    const plan = (await findLayoutPlan(team.workspaceId, planId))!;
    expect(plan.failureMessage).toMatch(/nest/);
    expect(plan.candidates[0].status).toBe("failed");
  }, 120_000);

  it("refuses a plan a reviewer asks for, and a group generator without a group column", async () => {
    const team = await createTeam();
    const { dataset } = await storePenguins({
      workspaceId: team.workspaceId,
      uploadedBy: team.analyst.id,
    });
    const input = {
      title: "t",
      datasetFileId: dataset.id,
      options: PENGUIN_OPTIONS,
      shardCount: 3,
      generators: [{ generator: "group-balanced" as const }],
    };
    actAs(team.reviewer);
    expect(await startLayoutPlan(team.workspaceId, input)).toMatchObject({ status: 403 });
    actAs(team.analyst);
    const refused = await startLayoutPlan(team.workspaceId, input);
    expect(refused.ok).toBe(false);
    expect(JSON.stringify(refused)).toMatch(/needs a group column/);
    expect(queue.jobs).toEqual([]);
  });
});
