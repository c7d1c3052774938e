// The worker's path for gzip CSV and Parquet uploads, against the real PostgreSQL and S3 fake that
// `npm test` starts: the stored report must hold the summary the engine gives for the CSV of the
// same table (penguins from the `vega-datasets` npm package, BSD-3). The gzip file is made by
// Node's zlib; the Parquet partition map by hyparquet-writer (used in tests only).
import { Readable } from "node:stream";
import { gzipSync } from "node:zlib";
import { eq } from "drizzle-orm";
import { parquetWriteBuffer } from "hyparquet-writer";
import { afterAll, describe, expect, it, vi } from "vitest";
import type { AnalysisJob } from "@/lib/jobs";

vi.mock("@/lib/auth/session", () => import("@/tests/support/fake-session"));

const queue = vi.hoisted(() => ({ jobs: [] as AnalysisJob[] }));
// Jobs are captured instead of sent, so this process runs each one when the test says.
vi.mock("@/lib/jobs", async (importOriginal) => ({
  ...(await importOriginal<typeof import("@/lib/jobs")>()),
  enqueueAnalysis: async (job: AnalysisJob) => {
    queue.jobs.push(job);
    return `captured-${queue.jobs.length}`;
  },
}));

import { startAnalysis } from "@/app/(workspace)/w/[workspaceId]/analyses/actions";
import { closeDb, db } from "@/db/client";
import { reports } from "@/db/schema";
import { analyzePartition } from "@/lib/analysis";
import { runAnalysis } from "@/lib/reports/run-analysis";
import { createTeam } from "@/tests/support/accounts";
import { actAs } from "@/tests/support/fake-session";
import { PENGUIN_OPTIONS, PENGUINS, storeInput } from "./support/stored-inputs";

afterAll(closeDb);

function islandMapParquet(): Uint8Array {
  const lines = PENGUINS.islandMap.trim().split("\n").slice(1);
  return new Uint8Array(
    parquetWriteBuffer({
      columnData: [
        { name: "row_id", data: lines.map((line) => Number(line.split(",")[0])), type: "INT32" },
        { name: "shard", data: lines.map((line) => line.split(",")[1]), type: "STRING" },
      ],
    }),
  );
}

describe("a worker run on compressed and columnar uploads", () => {
  it("stores the report of the CSV for a gzip dataset and a Parquet partition map", async () => {
    const team = await createTeam();
    const workspace = { workspaceId: team.workspaceId, uploadedBy: team.analyst.id };
    const dataset = await storeInput(
      workspace,
      "dataset",
      "penguins.csv.gz",
      gzipSync(PENGUINS.csv),
    );
    const layout = await storeInput(workspace, "layout", "islands.parquet", islandMapParquet());
    actAs(team.analyst);
    const started = await startAnalysis(team.workspaceId, {
      datasetFileId: dataset.id,
      layoutFileId: layout.id,
      options: PENGUIN_OPTIONS,
    });
    if (!started.ok) throw new Error(`startAnalysis failed: ${started.message}`);
    const result = await runAnalysis(queue.jobs.at(-1)!, { willRetry: true });
    expect(result.outcome).toBe("succeeded");

    const [report] = await db()
      .select()
      .from(reports)
      .where(eq(reports.analysisId, started.data.analysisId));
    const fromCsv = await analyzePartition({
      data: Readable.from([PENGUINS.csv]),
      partition: Readable.from([PENGUINS.islandMap]),
      options: PENGUIN_OPTIONS,
    });
    expect(report.summary).toEqual(JSON.parse(JSON.stringify(fromCsv)));
  });
});
