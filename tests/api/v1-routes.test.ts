// Every /api/v1 route × each role, no token, an expired or revoked token, and a token of another
// workspace, against PostgreSQL and the S3 fake that `npm test` starts. The expected statuses are
// written out by hand from issue 5 and product.md (reviewers read but never upload or analyse;
// nobody sees another workspace), not derived from lib/auth/roles.ts. Open data: penguins from the
// `vega-datasets` npm package (BSD-3), split by island.
import { randomUUID } from "node:crypto";
import { eq } from "drizzle-orm";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { GET as listAnalyses, POST as startAnalysis } from "@/app/api/v1/analyses/route";
import { GET as getAnalysis } from "@/app/api/v1/analyses/[analysisId]/route";
import { GET as listFiles, POST as registerFile } from "@/app/api/v1/files/route";
import { GET as listReports } from "@/app/api/v1/reports/route";
import { GET as getReport } from "@/app/api/v1/reports/[reportId]/route";
import { POST as abortUpload } from "@/app/api/v1/uploads/abort/route";
import { POST as completeUpload } from "@/app/api/v1/uploads/complete/route";
import { POST as signParts } from "@/app/api/v1/uploads/parts/route";
import { POST as createUpload } from "@/app/api/v1/uploads/route";
import { GET as getCaller } from "@/app/api/v1/workspace/route";
import { closeDb, db } from "@/db/client";
import { apiTokens } from "@/db/schema";
import { API_REQUESTS_PER_MINUTE } from "@/lib/api/rate-limit";
import {
  analysisListSchema,
  analysisStatusSchema,
  dataFileListSchema,
  reportListSchema,
  uploadTicketSchema,
} from "@/lib/api/schemas";
import { createMultipartUpload, presignUploadPart, putObject } from "@/lib/storage";
import { buildUploadKey } from "@/lib/uploads/file-rules";
import { registerUpload } from "@/lib/uploads/register-upload";
import { loadPenguinsCsv } from "@/tests/lib/analysis/support/open-data";
import { createAccount, createTeam } from "@/tests/support/accounts";
import { apiRequest, issueTestToken } from "@/tests/support/api-tokens";
import { insertReport, printPenguinsSummaryWithCli } from "@/tests/support/report-fixtures";

afterAll(closeDb);

type Team = Awaited<ReturnType<typeof createTeam>>;
type Fixtures = {
  team: Team;
  tokens: Record<"owner" | "analyst" | "reviewer" | "stranger" | "expired" | "revoked", string>;
  datasetKey: string;
  datasetFileId: string;
  analysisId: string;
  reportId: string;
  cliOutput: string;
};

let fixtures: Fixtures;

async function storePenguins(workspaceId: string): Promise<string> {
  const body = Buffer.from(loadPenguinsCsv().csv);
  const key = buildUploadKey(workspaceId, "penguins.csv", randomUUID());
  await putObject({ key, body, contentLength: body.length, contentType: "text/csv" });
  return key;
}

beforeAll(async () => {
  const team = await createTeam();
  const stranger = await createAccount("stranger");
  const cliOutput = await printPenguinsSummaryWithCli();
  const { reportId, analysisId } = await insertReport({
    workspaceId: team.workspaceId,
    authorId: team.analyst.id,
    summary: JSON.parse(cliOutput),
    title: "Penguins by island",
  });
  const datasetKey = await storePenguins(team.workspaceId);
  const dataset = await registerUpload(team.workspaceId, team.owner.id, {
    key: datasetKey,
    name: "penguins.csv",
    kind: "dataset",
  });
  const issue = (userId: string, workspaceId = team.workspaceId, expiresAt?: Date) =>
    issueTestToken(userId, workspaceId, expiresAt).then(({ token }) => token);
  const revoked = await issueTestToken(team.analyst.id, team.workspaceId);
  await db()
    .update(apiTokens)
    .set({ revokedAt: new Date() })
    .where(eq(apiTokens.id, revoked.tokenId));
  fixtures = {
    team,
    tokens: {
      owner: await issue(team.owner.id),
      analyst: await issue(team.analyst.id),
      reviewer: await issue(team.reviewer.id),
      stranger: await issue(stranger.id, stranger.workspaceId),
      expired: await issue(team.analyst.id, team.workspaceId, new Date(Date.now() - 60_000)),
      revoked: revoked.token,
    },
    datasetKey,
    datasetFileId: dataset.id,
    analysisId,
    reportId,
    cliOutput,
  };
});

type Probe = {
  route: string;
  /** Status for a role allowed to call it (a well-formed request in the token's workspace). */
  allowed: number;
  reviewer: number;
  /** Status for a token of another workspace naming this workspace's objects. */
  stranger: number;
  call: (token: string | undefined) => Promise<Response>;
};

const foreignKey = () => buildUploadKey(fixtures.team.workspaceId, "layout.csv", randomUUID());

const PROBES: Probe[] = [
  {
    route: "GET /api/v1/workspace",
    allowed: 200,
    reviewer: 200,
    stranger: 200, // it answers with the stranger's own workspace
    call: (token) => getCaller(apiRequest("/api/v1/workspace", token)),
  },
  {
    route: "POST /api/v1/uploads",
    allowed: 201,
    reviewer: 403,
    stranger: 201, // a fresh key under the stranger's own workspace
    call: (token) =>
      createUpload(
        apiRequest("/api/v1/uploads", token, {
          name: "penguins.csv",
          size: 1000,
          kind: "dataset",
          contentType: "text/csv",
        }),
      ),
  },
  {
    route: "POST /api/v1/uploads/parts",
    allowed: 200,
    reviewer: 403,
    stranger: 404,
    call: (token) =>
      signParts(
        apiRequest("/api/v1/uploads/parts", token, {
          key: foreignKey(),
          uploadId: "an-upload",
          partNumbers: [1, 2],
        }),
      ),
  },
  {
    route: "POST /api/v1/uploads/complete",
    allowed: 200,
    reviewer: 403,
    stranger: 404,
    call: async (token) => {
      // A real one-part multipart upload in the team's workspace, waiting to be assembled.
      const key = foreignKey();
      const uploadId = await createMultipartUpload({ key, contentType: "text/csv" });
      const url = await presignUploadPart({ key, uploadId, partNumber: 1, expiresInSeconds: 60 });
      const part = await fetch(url, { method: "PUT", body: "row_id,shard\n0,a\n" });
      const etag = part.headers.get("etag") ?? "";
      return completeUpload(
        apiRequest("/api/v1/uploads/complete", token, {
          key,
          uploadId,
          parts: [{ partNumber: 1, etag }],
        }),
      );
    },
  },
  {
    route: "POST /api/v1/uploads/abort",
    allowed: 204,
    reviewer: 403,
    stranger: 404,
    call: (token) =>
      abortUpload(
        apiRequest("/api/v1/uploads/abort", token, {
          key: foreignKey(),
          uploadId: "no-such-upload",
        }),
      ),
  },
  {
    route: "POST /api/v1/files",
    allowed: 201,
    reviewer: 403,
    stranger: 404,
    call: (token) =>
      registerFile(
        apiRequest("/api/v1/files", token, {
          key: fixtures.datasetKey,
          name: "penguins.csv",
          kind: "dataset",
        }),
      ),
  },
  {
    route: "POST /api/v1/analyses",
    allowed: 202,
    reviewer: 403,
    stranger: 422, // the dataset id names no file in the stranger's workspace
    call: (token) =>
      startAnalysis(
        apiRequest("/api/v1/analyses", token, {
          title: "Penguins by island (API)",
          datasetFileId: fixtures.datasetFileId,
          options: { labelColumn: "Species", shardColumn: "Island", idColumn: "row" },
        }),
      ),
  },
  {
    route: "GET /api/v1/analyses/{analysisId}",
    allowed: 200,
    reviewer: 200,
    stranger: 404,
    call: (token) =>
      getAnalysis(apiRequest(`/api/v1/analyses/${fixtures.analysisId}`, token), {
        params: Promise.resolve({ analysisId: fixtures.analysisId }),
      }),
  },
  {
    route: "GET /api/v1/reports",
    allowed: 200,
    reviewer: 200,
    stranger: 200, // the stranger's own (empty) list
    call: (token) => listReports(apiRequest("/api/v1/reports", token)),
  },
  {
    route: "GET /api/v1/reports/{reportId}",
    allowed: 200,
    reviewer: 200,
    stranger: 404,
    call: (token) =>
      getReport(apiRequest(`/api/v1/reports/${fixtures.reportId}`, token), {
        params: Promise.resolve({ reportId: fixtures.reportId }),
      }),
  },
];

async function outcome(response: Response): Promise<{ status: number; code?: string }> {
  if (response.status < 400) return { status: response.status };
  const body = (await response.json()) as { error: { code: string; message: string } };
  expect(body.error.message.length).toBeGreaterThan(0);
  return { status: response.status, code: body.error.code };
}

describe("/api/v1 access", () => {
  it.each(PROBES.map((probe) => [probe.route, probe] as const))(
    "%s answers each caller as expected",
    async (_route, probe) => {
      const { tokens } = fixtures;
      const seen = {
        owner: (await outcome(await probe.call(tokens.owner))).status,
        analyst: (await outcome(await probe.call(tokens.analyst))).status,
        reviewer: await outcome(await probe.call(tokens.reviewer)),
        none: await outcome(await probe.call(undefined)),
        expired: await outcome(await probe.call(tokens.expired)),
        revoked: await outcome(await probe.call(tokens.revoked)),
        stranger: (await outcome(await probe.call(tokens.stranger))).status,
      };
      expect(seen).toEqual({
        owner: probe.allowed,
        analyst: probe.allowed,
        reviewer:
          probe.reviewer === 403 ? { status: 403, code: "forbidden" } : { status: probe.reviewer },
        none: { status: 401, code: "missing_token" },
        expired: { status: 401, code: "token_expired" },
        revoked: { status: 401, code: "token_revoked" },
        stranger: probe.stranger,
      });
    },
  );

  it("never lists another workspace's reports", async () => {
    const response = await listReports(apiRequest("/api/v1/reports", fixtures.tokens.stranger));
    expect(reportListSchema.parse(await response.json()).reports).toEqual([]);
  });
});

describe("/api/v1 answers", () => {
  it("serves the report's summary as the CLI printed it, with its inputs appended", async () => {
    const response = await getReport(
      apiRequest(`/api/v1/reports/${fixtures.reportId}`, fixtures.tokens.reviewer),
      { params: Promise.resolve({ reportId: fixtures.reportId }) },
    );
    expect(response.headers.get("content-type")).toBe("application/json; charset=utf-8");
    const text = await response.text();
    // The CLI's bytes up to its closing brace, then the inputs as analysed.
    expect(text.startsWith(fixtures.cliOutput.slice(0, -3))).toBe(true);
    expect(JSON.parse(text).inputs.files).toEqual([
      { kind: "dataset", name: "penguins.csv", sizeBytes: 15_000, sha256: "0".repeat(64) },
    ]);
  });

  it("pages the reports list with the cursor it hands out, and refuses one it did not", async () => {
    const team = await createTeam();
    for (const title of ["First", "Second", "Third"]) {
      await insertReport({
        workspaceId: team.workspaceId,
        authorId: team.analyst.id,
        summary: JSON.parse(fixtures.cliOutput),
        title,
      });
    }
    const { token } = await issueTestToken(team.reviewer.id, team.workspaceId);
    const page = async (query: string) =>
      reportListSchema.parse(
        await (await listReports(apiRequest(`/api/v1/reports?${query}`, token))).json(),
      );
    const everything = await page("limit=100");
    expect(everything.reports.map((report) => report.title)).toEqual(["Third", "Second", "First"]);
    expect(everything.nextCursor).toBeNull();
    const first = await page("limit=2");
    expect(first.nextCursor).toEqual(expect.any(String));
    const second = await page(`limit=2&cursor=${first.nextCursor}`);
    expect([...first.reports, ...second.reports]).toEqual(everything.reports);
    expect(second.nextCursor).toBeNull();
    const forged = await listReports(apiRequest("/api/v1/reports?cursor=not-a-cursor", token));
    expect(forged.status).toBe(422);
    expect(await forged.json()).toMatchObject({ error: { code: "invalid" } });
  });

  it("pages the files and analyses lists the same way, newest first, in the documented shapes", async () => {
    const team = await createTeam();
    const fileIds: string[] = [];
    for (const name of ["a.csv", "b.csv", "c.csv"]) {
      const key = buildUploadKey(team.workspaceId, name, randomUUID());
      // Different bytes each, so none is taken for a repeat of another.
      await putObject({ key, body: `x,y\n1,${name}\n2,z\n`, contentType: "text/csv" });
      fileIds.push(
        (await registerUpload(team.workspaceId, team.owner.id, { key, name, kind: "dataset" })).id,
      );
      await insertReport({
        workspaceId: team.workspaceId,
        authorId: team.analyst.id,
        summary: JSON.parse(fixtures.cliOutput),
        title: name,
      });
    }
    const { token } = await issueTestToken(team.reviewer.id, team.workspaceId);
    const files = async (query: string) =>
      dataFileListSchema.parse(
        await (await listFiles(apiRequest(`/api/v1/files?${query}`, token))).json(),
      );
    const analyses = async (query: string) =>
      analysisListSchema.parse(
        await (await listAnalyses(apiRequest(`/api/v1/analyses?${query}`, token))).json(),
      );
    const allFiles = await files("limit=100");
    // insertReport stores each report's penguins files too: the three uploads are among them.
    expect(allFiles.files.map((file) => file.id)).toEqual(expect.arrayContaining(fileIds));
    expect(allFiles.nextCursor).toBeNull();
    const newestFirst = (dates: string[]) => [...dates].sort().reverse();
    const fileDates = allFiles.files.map((file) => file.createdAt);
    expect(fileDates).toEqual(newestFirst(fileDates));
    const firstFiles = await files("limit=2");
    const restFiles = await files(`limit=100&cursor=${firstFiles.nextCursor}`);
    expect([...firstFiles.files, ...restFiles.files]).toEqual(allFiles.files);

    const allAnalyses = await analyses("limit=100");
    expect(allAnalyses.analyses.map((analysis) => analysis.status)).toEqual([
      "succeeded",
      "succeeded",
      "succeeded",
    ]);
    const one = await analyses("limit=1");
    const two = await analyses(`limit=1&cursor=${one.nextCursor}`);
    const three = await analyses(`limit=1&cursor=${two.nextCursor}`);
    expect([...one.analyses, ...two.analyses, ...three.analyses]).toEqual(allAnalyses.analyses);
    expect(three.nextCursor).toBeNull();

    for (const forged of [
      await listFiles(apiRequest("/api/v1/files?cursor=not-a-cursor", token)),
      await listAnalyses(apiRequest("/api/v1/analyses?cursor=not-a-cursor", token)),
    ]) {
      expect(forged.status).toBe(422);
    }
    // Another workspace's token sees none of them.
    const stranger = await createAccount("stranger");
    const theirs = await issueTestToken(stranger.id, stranger.workspaceId);
    const seen = await listFiles(apiRequest("/api/v1/files", theirs.token));
    expect(dataFileListSchema.parse(await seen.json()).files).toEqual([]);
  });

  it("lists reports and analysis status in the documented shapes", async () => {
    // Penguins by island under the default plan: ρ between ½ and 2, no clear winner
    // (tests/lib/reports/figures-from-cli.test.ts checks that against methods.md §5 by hand).
    expect(JSON.parse(fixtures.cliOutput).advice.verdict).toBe("no-clear-winner");
    const listed = async (verdict: string) => {
      const list = await listReports(
        apiRequest(`/api/v1/reports?verdict=${verdict}&limit=5`, fixtures.tokens.reviewer),
      );
      return reportListSchema.parse(await list.json()).reports.map((report) => report.id);
    };
    expect(await listed("no-clear-winner")).toEqual([fixtures.reportId]);
    expect(await listed("large-minibatch")).toEqual([]);
    const status = await getAnalysis(
      apiRequest(`/api/v1/analyses/${fixtures.analysisId}`, fixtures.tokens.reviewer),
      { params: Promise.resolve({ analysisId: fixtures.analysisId }) },
    );
    expect(analysisStatusSchema.parse(await status.json())).toMatchObject({
      status: "succeeded",
      progress: 1,
      reportId: fixtures.reportId,
    });
  });

  it("takes a file through an upload URL it issued, then registers it with a preview", async () => {
    const { islandMap } = loadPenguinsCsv();
    const ticketResponse = await createUpload(
      apiRequest("/api/v1/uploads", fixtures.tokens.analyst, {
        name: "islands.csv",
        size: Buffer.byteLength(islandMap),
        kind: "layout",
      }),
    );
    const ticket = uploadTicketSchema.parse(await ticketResponse.json());
    if (ticket.method !== "single") throw new Error("a small file is sent in one PUT");
    const put = await fetch(ticket.url, {
      method: "PUT",
      headers: ticket.headers,
      body: islandMap,
    });
    expect(put.status).toBe(200);
    const registered = await registerFile(
      apiRequest("/api/v1/files", fixtures.tokens.analyst, {
        key: ticket.key,
        name: "islands.csv",
        kind: "layout",
      }),
    );
    expect(registered.status).toBe(201);
    const file = (await registered.json()) as { kind: string; preview: { columns: unknown[] } };
    expect(file.kind).toBe("layout");
    expect(file.preview.columns).toMatchObject([{ name: "row_id" }, { name: "shard" }]);
  });

  it("answers malformed input with 422, a stable code and field errors", async () => {
    const noOptions = await startAnalysis(
      apiRequest("/api/v1/analyses", fixtures.tokens.analyst, { datasetFileId: "x" }),
    );
    expect(noOptions.status).toBe(422);
    expect(await noOptions.json()).toMatchObject({
      error: { code: "invalid", fieldErrors: { options: expect.any(String) } },
    });
    const badLimit = await listReports(
      apiRequest("/api/v1/reports?limit=0", fixtures.tokens.analyst),
    );
    expect(badLimit.status).toBe(422);
    const notJson = await registerFile(
      new Request("http://partita.test/api/v1/files", {
        method: "POST",
        headers: { authorization: `Bearer ${fixtures.tokens.analyst}` },
        body: "key=1",
      }),
    );
    expect([
      notJson.status,
      ((await notJson.json()) as { error: { code: string } }).error.code,
    ]).toEqual([422, "invalid"]);
  });

  it("limits each token's requests per minute with 429 and Retry-After", async () => {
    const { token } = await issueTestToken(fixtures.team.reviewer.id, fixtures.team.workspaceId);
    for (let request = 0; request < API_REQUESTS_PER_MINUTE; request += 1) {
      expect((await getCaller(apiRequest("/api/v1/workspace", token))).status).toBe(200);
    }
    const limited = await getCaller(apiRequest("/api/v1/workspace", token));
    expect(limited.status).toBe(429);
    expect(Number(limited.headers.get("retry-after"))).toBeGreaterThan(0);
    expect(((await limited.json()) as { error: { code: string } }).error.code).toBe("rate_limited");
    // Another token of the same user has its own budget.
    const other = await issueTestToken(fixtures.team.reviewer.id, fixtures.team.workspaceId);
    expect((await getCaller(apiRequest("/api/v1/workspace", other.token))).status).toBe(200);
  });
});
