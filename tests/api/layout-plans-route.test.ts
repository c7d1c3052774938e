// /api/v1/layout-plans (create, status, result) × each role, no token and a stranger's token,
// against PostgreSQL and the S3 fake that `npm test` starts; the plan is run by the job's runner in
// this process. Expected statuses are written out by hand from product.md (reviewers read but
// never analyse; nobody sees another workspace). Open data: penguins from the `vega-datasets` npm
// package (BSD-3). The outside check of the result: methods.md §8's keys and ranking rule.
import { Readable } from "node:stream";
import { afterAll, beforeAll, describe, expect, it, vi } from "vitest";
import type { LayoutPlanJob } from "@/lib/jobs";

const queue = vi.hoisted(() => ({ jobs: [] as LayoutPlanJob[] }));
// Jobs are captured instead of sent, so this process runs each one when the test says.
vi.mock("@/lib/jobs", async (importOriginal) => ({
  ...(await importOriginal<typeof import("@/lib/jobs")>()),
  enqueueLayoutPlan: async (job: LayoutPlanJob) => {
    queue.jobs.push(job);
    return `captured-${queue.jobs.length}`;
  },
}));

import { POST as startPlan } from "@/app/api/v1/layout-plans/route";
import { GET as getPlan } from "@/app/api/v1/layout-plans/[planId]/route";
import { GET as getResult } from "@/app/api/v1/layout-plans/[planId]/result/route";
import { GET as getMap } from "@/app/api/v1/layout-plans/[planId]/candidates/[candidate]/map/route";
import { closeDb } from "@/db/client";
import { createApiDocument } from "@/lib/api/openapi";
import { layoutComparisonSchema, layoutPlanStatusSchema } from "@/lib/api/schemas";
import { runLayoutPlan } from "@/lib/layout-plans/run-layout-plan";
import { createAccount, createTeam } from "@/tests/support/accounts";
import { apiRequest, issueTestToken } from "@/tests/support/api-tokens";
import { analyzePartition } from "@/lib/analysis";
import {
  PENGUIN_OPTIONS,
  PENGUINS,
  storePenguins,
} from "@/tests/lib/reports/support/stored-inputs";

afterAll(closeDb);

let team: Awaited<ReturnType<typeof createTeam>>;
let datasetFileId: string;
const tokens = {} as Record<"owner" | "analyst" | "reviewer" | "stranger", string>;

beforeAll(async () => {
  team = await createTeam();
  const stranger = await createAccount("stranger");
  datasetFileId = (
    await storePenguins({ workspaceId: team.workspaceId, uploadedBy: team.analyst.id })
  ).dataset.id;
  for (const role of ["owner", "analyst", "reviewer"] as const) {
    tokens[role] = (await issueTestToken(team[role].id, team.workspaceId)).token;
  }
  tokens.stranger = (await issueTestToken(stranger.id, stranger.workspaceId)).token;
});

const planBody = () => ({
  title: "Penguin layouts",
  datasetFileId,
  options: PENGUIN_OPTIONS,
  shardCount: 3,
  generators: [{ generator: "stratified" }, { generator: "dirichlet", alpha: 0.5 }],
  seed: 3,
});

const post = (token: string | undefined, body: unknown) =>
  startPlan(apiRequest("/api/v1/layout-plans", token, body));
const get = (handler: typeof getPlan, path: string, planId: string, token?: string) =>
  handler(apiRequest(path, token), { params: Promise.resolve({ planId }) });
const getCandidateMap = (planId: string, candidate: string, token?: string) =>
  getMap(apiRequest(`/api/v1/layout-plans/${planId}/candidates/${candidate}/map`, token), {
    params: Promise.resolve({ planId, candidate }),
  });

describe("/api/v1/layout-plans", () => {
  it("lets owners and analysts queue a plan, and refuses reviewers, no token and bad input", async () => {
    for (const role of ["owner", "analyst"] as const) {
      const response = await post(tokens[role], planBody());
      expect(response.status, role).toBe(202);
      const body = await response.json();
      expect(body.statusUrl).toBe(`/api/v1/layout-plans/${body.planId}`);
    }
    expect((await post(tokens.reviewer, planBody())).status).toBe(403);
    expect((await post(undefined, planBody())).status).toBe(401);
    const grouped = await post(tokens.analyst, {
      ...planBody(),
      generators: [{ generator: "group-hash" }],
    });
    expect(grouped.status).toBe(422);
    expect((await grouped.json()).error.fieldErrors.groupColumn).toMatch(/group column/);
    // Another workspace's dataset is not this workspace's file.
    expect((await post(tokens.stranger, planBody())).status).toBe(422);
  });

  it("answers status to every member, the result once ended, and 404 to another workspace", async () => {
    queue.jobs.length = 0;
    const created = await (await post(tokens.analyst, planBody())).json();
    const { planId } = created;
    const statusPath = `/api/v1/layout-plans/${planId}`;
    const resultPath = `${statusPath}/result`;

    const queued = await get(getPlan, statusPath, planId, tokens.reviewer);
    expect(queued.status).toBe(200);
    const queuedBody = layoutPlanStatusSchema.parse(await queued.json());
    expect(queuedBody.candidates.map((candidate) => candidate.name)).toEqual([
      "stratified",
      "dirichlet-0.5",
    ]);
    expect((await get(getResult, resultPath, planId, tokens.reviewer)).status).toBe(409);
    expect((await get(getPlan, statusPath, planId, tokens.stranger)).status).toBe(404);
    expect((await get(getPlan, statusPath, planId)).status).toBe(401);
    expect((await getCandidateMap(planId, "stratified", tokens.reviewer)).status).toBe(409);

    await runLayoutPlan(queue.jobs[0], { willRetry: false });
    const result = await get(getResult, resultPath, planId, tokens.reviewer);
    expect(result.status).toBe(200);
    const comparison = layoutComparisonSchema.parse(await result.json());
    expect(comparison.shardCount).toBe(3);
    expect(comparison.failures).toEqual([]);
    // methods.md §8: ranked by ρ, then by weighted JS; every layout records generator and seed.
    const keys = comparison.layouts.map((layout) => {
      const summary = layout.summary as unknown as {
        advice: { ratio: number };
        labelSkew: { js: number };
      };
      return [summary.advice.ratio, summary.labelSkew.js];
    });
    for (let k = 1; k < keys.length; k++) {
      expect(
        keys[k][0] > keys[k - 1][0] ||
          (keys[k][0] === keys[k - 1][0] && keys[k][1] >= keys[k - 1][1]),
      ).toBe(true);
    }
    expect(comparison.layouts.map((layout) => [layout.seed, layout.shards])).toEqual([
      [3, 3],
      [3, 3],
    ]);
    expect((await get(getResult, resultPath, planId, tokens.stranger)).status).toBe(404);

    // Each candidate's map, to every member; methods.md §8: the analysis given the map reaches the
    // summary in the comparison.
    for (const layout of comparison.layouts) {
      const response = await getCandidateMap(planId, layout.name, tokens.reviewer);
      expect(response.status, layout.name).toBe(200);
      expect(response.headers.get("content-type")).toMatch(/^text\/csv/);
      expect(response.headers.get("content-disposition")).toContain(`${layout.name}.csv`);
      const map = await response.text();
      expect(map.startsWith("row_id,shard\n")).toBe(true);
      const direct = await analyzePartition({
        data: Readable.from([PENGUINS.csv]),
        partition: Readable.from([map]),
        options: PENGUIN_OPTIONS,
        threads: 1,
      });
      expect(layout.summary, layout.name).toEqual(JSON.parse(JSON.stringify(direct)));
    }
    expect((await getCandidateMap(planId, "stratified", tokens.stranger)).status).toBe(404);
    expect((await getCandidateMap(planId, "stratified")).status).toBe(401);
    const unknown = await getCandidateMap(planId, "iid", tokens.owner);
    expect(unknown.status).toBe(404);
    expect((await unknown.json()).error.message).toMatch(/stratified, dirichlet-0\.5/);
  }, 120_000);

  it("is in the OpenAPI document", () => {
    const paths = createApiDocument().paths ?? {};
    expect(paths["/api/v1/layout-plans"]?.post?.operationId).toBe("startLayoutPlan");
    expect(paths["/api/v1/layout-plans/{planId}"]?.get?.operationId).toBe("getLayoutPlanStatus");
    expect(paths["/api/v1/layout-plans/{planId}/result"]?.get?.operationId).toBe(
      "getLayoutComparison",
    );
    const map = paths["/api/v1/layout-plans/{planId}/candidates/{candidate}/map"]?.get;
    expect(map?.operationId).toBe("getLayoutCandidateMap");
    expect(Object.keys(map?.responses?.["200"]?.content ?? {})).toEqual(["text/csv"]);
  });
});
