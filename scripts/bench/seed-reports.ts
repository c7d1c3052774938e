/**
 * Seeds the load test's workspace (scripts/bench/load-test.ts): one account, `count` reports that
 * each hold the given summary and its per-shard table, stored as the worker stores them, and one
 * API token per load-test client (the API limits requests per token), and a signed-in browser
 * session for the reports page (a session row and its cookie, as a sign-in makes them). Prints
 * `{ tokens, reportId, workspaceId, sessionCookie }` as JSON. Runs in a child process under `--conditions=react-server`, as
 * the worker does, because the query modules are server-only.
 *
 * Usage: node --conditions=react-server --import tsx scripts/bench/seed-reports.ts SUMMARY COUNT TOKENS
 */
import { readFileSync } from "node:fs";
import { encode } from "next-auth/jwt";
import { closeDb, db } from "@/db/client";
import { insertApiToken } from "@/db/queries/api-tokens";
import { insertReportWithShards } from "@/db/queries/report-store";
import { openSession } from "@/db/queries/sessions";
import { createAccountWithWorkspace } from "@/db/queries/workspaces";
import { analyses, dataFiles } from "@/db/schema";
import type { PartitionSummary } from "@/lib/analysis";
import { API_TOKENS } from "@/lib/auth/api-token-secret";
import { SESSION_MAX_AGE_SECONDS } from "@/lib/auth/options";
import { env } from "@/lib/env";

async function seed(summary: PartitionSummary, count: number, tokenCount: number) {
  const email = `load-${crypto.randomUUID().slice(0, 8)}@bench.partita.local`;
  const { userId, workspaceId } = await createAccountWithWorkspace({
    name: "Load test",
    email,
    passwordHash: null,
    workspaceName: "Load test",
  });
  const [dataset] = await db()
    .insert(dataFiles)
    .values({
      workspaceId,
      kind: "dataset",
      name: "bench.csv",
      objectKey: `workspaces/${workspaceId}/files/bench/bench.csv`,
      sizeBytes: 1,
      uploadedBy: userId,
    })
    .returning({ id: dataFiles.id });
  const parameters = { labelColumn: "label", shardColumn: "shard" };
  let reportId = "";
  for (let index = 0; index < count; index++) {
    const [analysis] = await db()
      .insert(analyses)
      .values({
        workspaceId,
        title: `Bench report ${index + 1}`,
        datasetFileId: dataset.id,
        parameters,
        status: "succeeded",
        createdBy: userId,
      })
      .returning({ id: analyses.id });
    reportId = crypto.randomUUID();
    await insertReportWithShards(db(), {
      id: reportId,
      workspaceId,
      analysisId: analysis.id,
      lineageId: reportId,
      version: 1,
      title: `Bench report ${index + 1}`,
      summary,
      parameters,
      inputs: [],
      timings: { total: 0 },
      authorId: userId,
    });
  }
  const tokens: string[] = [];
  for (let index = 0; index < tokenCount; index++) {
    const { secret: token, hash: tokenHash } = API_TOKENS.create();
    await insertApiToken({
      workspaceId,
      userId,
      name: `load client ${index + 1}`,
      tokenHash,
      expiresAt: new Date(Date.now() + 24 * 60 * 60 * 1000),
    });
    tokens.push(token);
  }
  // The cookie next-auth would set on sign-in: a JWT naming the user and a live session row.
  const sessionExpires = new Date(Date.now() + SESSION_MAX_AGE_SECONDS * 1000);
  const sessionId = await openSession(userId, sessionExpires);
  const jwt = await encode({
    token: { sub: userId, email, name: "Load test", sid: sessionId },
    secret: env().NEXTAUTH_SECRET,
    maxAge: SESSION_MAX_AGE_SECONDS,
  });
  return { tokens, reportId, workspaceId, sessionCookie: `next-auth.session-token=${jwt}` };
}

const [summaryFile, count, tokenCount] = process.argv.slice(2);
const summary = JSON.parse(readFileSync(summaryFile, "utf8")) as PartitionSummary;
seed(summary, Number(count), Number(tokenCount))
  .then((seeded) => process.stdout.write(`${JSON.stringify(seeded)}\n`))
  .finally(closeDb);
