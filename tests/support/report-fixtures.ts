import { execFile } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { promisify } from "node:util";
import { eq } from "drizzle-orm";
import { db } from "@/db/client";
import { insertReportWithShards } from "@/db/queries/report-store";
import { analyses, dataFiles, reports } from "@/db/schema";
import type { PartitionSummary } from "@/lib/analysis";
import { loadPenguinsCsv } from "@/tests/lib/analysis/support/open-data";

const run = promisify(execFile);
const root = path.resolve(import.meta.dirname, "../..");

/**
 * The summary `npm run analyze` prints for penguins (vega-datasets, BSD-3) with the shard column
 * Island, run as a child process exactly as a user or pipeline would, plus any extra flags.
 */
export async function analyzePenguinsWithCli(extraFlags: string[] = []): Promise<PartitionSummary> {
  return JSON.parse(await printPenguinsSummaryWithCli(extraFlags)) as PartitionSummary;
}

/** The CLI's JSON output, as text, for penguins split by island (see analyzePenguinsWithCli). */
export async function printPenguinsSummaryWithCli(extraFlags: string[] = []): Promise<string> {
  return runAnalyzeOnPenguins({}, ["--shard-column", "Island", ...extraFlags]);
}

/**
 * The CLI's summary of penguins (vega-datasets, BSD-3) split by a partition map that deals row i
 * to shard `colony-${i mod colonies}`: more shards than a page of the per-shard table holds.
 */
export async function analyzePenguinColoniesWithCli(colonies: number): Promise<PartitionSummary> {
  const lines = ["row_id,shard"];
  for (let row = 0; row < 344; row++) lines.push(`${row},colony-${row % colonies}`);
  const map = `${lines.join("\n")}\n`;
  return JSON.parse(
    await runAnalyzeOnPenguins({ "colonies.csv": map }, ["--partition", "colonies.csv"]),
  ) as PartitionSummary;
}

/** `npm run analyze` on penguins.csv beside `files` in a temporary folder, as a child process. */
async function runAnalyzeOnPenguins(
  files: Record<string, string>,
  flags: string[],
): Promise<string> {
  const directory = mkdtempSync(path.join(tmpdir(), "partita-report-fixture-"));
  const inFolder = (name: string) => path.join(directory, name);
  writeFileSync(inFolder("penguins.csv"), loadPenguinsCsv().csv);
  for (const [name, text] of Object.entries(files)) writeFileSync(inFolder(name), text);
  const resolved = flags.map((flag) => (flag in files ? inFolder(flag) : flag));
  try {
    const { stdout } = await run(
      process.execPath,
      [
        "--import",
        "tsx",
        "scripts/analyze.ts",
        "--data",
        inFolder("penguins.csv"),
        "--label",
        "Species",
        "--id-column",
        "row",
        ...resolved,
      ],
      { cwd: root, env: { ...process.env, DEBUG: "" }, maxBuffer: 64 * 1024 * 1024 },
    );
    return stdout;
  } finally {
    rmSync(directory, { recursive: true, force: true });
  }
}

/**
 * Stores a finished report the way the worker does (an analysis, the report, its per-shard table),
 * without running a job. A `previousReportId` continues that report's lineage with the next version.
 */
export async function insertReport(input: {
  workspaceId: string;
  authorId: string;
  summary: PartitionSummary;
  title?: string;
  previousReportId?: string;
  createdAt?: Date;
}): Promise<{ reportId: string; analysisId: string }> {
  const { workspaceId, authorId, summary } = input;
  const title = input.title ?? "Penguins by island";
  const [dataset] = await db()
    .insert(dataFiles)
    .values({
      workspaceId,
      kind: "dataset",
      name: "penguins.csv",
      objectKey: `workspaces/${workspaceId}/files/${crypto.randomUUID()}/penguins.csv`,
      sizeBytes: 15_000,
      contentType: "text/csv",
      uploadedBy: authorId,
    })
    .returning({ id: dataFiles.id });
  const parameters = {
    labelColumn: "Species",
    shardColumn: "Island",
    localSteps: summary.advice.localSteps,
    rounds: summary.advice.rounds,
    batchSize: summary.advice.batchSize,
  };
  const [analysis] = await db()
    .insert(analyses)
    .values({
      workspaceId,
      title,
      datasetFileId: dataset.id,
      parameters,
      previousReportId: input.previousReportId,
      status: "succeeded",
      fraction: 1,
      createdBy: authorId,
    })
    .returning({ id: analyses.id });
  const previous = input.previousReportId
    ? (
        await db()
          .select({ lineageId: reports.lineageId, version: reports.version })
          .from(reports)
          .where(eq(reports.id, input.previousReportId))
      )[0]
    : undefined;
  const reportId = crypto.randomUUID();
  await insertReportWithShards(db(), {
    id: reportId,
    workspaceId,
    analysisId: analysis.id,
    lineageId: previous?.lineageId ?? reportId,
    version: (previous?.version ?? 0) + 1,
    previousReportId: input.previousReportId,
    title,
    summary,
    parameters,
    inputs: [
      {
        kind: "dataset",
        name: "penguins.csv",
        objectKey: `workspaces/${workspaceId}/files/fixture/penguins.csv`,
        sizeBytes: 15_000,
        sha256: "0".repeat(64),
      },
    ],
    timings: { total: 1 },
    authorId,
    createdAt: input.createdAt,
  });
  return { reportId, analysisId: analysis.id };
}
