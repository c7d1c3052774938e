/**
 * Queues one analysis of a bench file for the workers bench (scripts/bench/bench-workers.ts): a new
 * account and workspace, the file uploaded to storage and registered with its SHA-256, the analysis
 * (label column `label`, shard column `shard`) stored and its job sent, as the start action does.
 * Prints `{ analysisId }` as JSON. Runs under `--conditions=react-server`, as the worker does,
 * because the query modules are server-only.
 *
 * Usage: node --conditions=react-server --import tsx scripts/bench/queue-analysis.ts FILE SHA256
 */
import { createReadStream, statSync } from "node:fs";
import path from "node:path";
import { eq } from "drizzle-orm";
import { closeDb, db } from "@/db/client";
import { createAccountWithWorkspace } from "@/db/queries/workspaces";
import { analyses, dataFiles } from "@/db/schema";
import { ANALYSIS_JOB_POLICY, ANALYSIS_QUEUE, startBoss } from "@/lib/jobs";
import { putObject } from "@/lib/storage";

async function queue(file: string, sha256: string): Promise<string> {
  const { userId, workspaceId } = await createAccountWithWorkspace({
    name: "Workers bench",
    email: `workers-${crypto.randomUUID().slice(0, 8)}@bench.partita.local`,
    passwordHash: null,
    workspaceName: "Workers bench",
  });
  const name = path.basename(file);
  const objectKey = `workspaces/${workspaceId}/files/${crypto.randomUUID()}/${name}`;
  const sizeBytes = statSync(file).size;
  await putObject({
    key: objectKey,
    body: createReadStream(file),
    contentLength: sizeBytes,
    contentType: "text/csv",
  });
  const [dataset] = await db()
    .insert(dataFiles)
    .values({
      workspaceId,
      kind: "dataset",
      name,
      objectKey,
      sizeBytes,
      sha256,
      contentType: "text/csv",
      uploadedBy: userId,
    })
    .returning({ id: dataFiles.id });
  const [analysis] = await db()
    .insert(analyses)
    .values({
      workspaceId,
      title: `Workers bench: ${name}`,
      datasetFileId: dataset.id,
      parameters: { labelColumn: "label", shardColumn: "shard" },
      createdBy: userId,
    })
    .returning({ id: analyses.id });
  const boss = await startBoss({
    applicationName: "partita-bench",
    supervise: false,
    maxConnections: 1,
  });
  try {
    const jobId = await boss.send(
      ANALYSIS_QUEUE,
      { analysisId: analysis.id, workspaceId },
      { ...ANALYSIS_JOB_POLICY, singletonKey: analysis.id },
    );
    await db().update(analyses).set({ jobId }).where(eq(analyses.id, analysis.id));
  } finally {
    await boss.stop({ graceful: false });
  }
  return analysis.id;
}

const [file, sha256] = process.argv.slice(2);
queue(file, sha256)
  .then(async (analysisId) => {
    process.stdout.write(`${JSON.stringify({ analysisId })}\n`);
    await closeDb();
  })
  .catch((error: unknown) => {
    process.stderr.write(`${error instanceof Error ? (error.stack ?? error.message) : error}\n`);
    process.exit(1);
  });
