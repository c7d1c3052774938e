// One analysis shared by two workers whose memory limit (1 MiB) is below their part's values: each
// part keeps its rows in a scratch file, as a one-process analysis does past the limit (run-notes
// test), and the summary must still equal the engine's one-process analysis of the same bytes in
// memory to 1e-9 relative (methods.md §9's defining identity; the one-process analysis is checked
// against scikit-learn elsewhere). The data is scikit-learn's bundled digits stacked 23 times
// (41 331 rows: each half's values, about 2.3 MB, are past the limit's 40 % share).
import { Readable } from "node:stream";
import { eq } from "drizzle-orm";
import PgBoss from "pg-boss";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { listAnalysisParts } from "@/db/queries/analysis-parts";
import { reports } from "@/db/schema";
import { analyzePartition } from "@/lib/analysis";
import { startBoss } from "@/lib/jobs";
import { describeRun } from "@/lib/reports/run-notes";
import { runAnalysis } from "@/lib/reports/run-analysis";
import {
  expectOneProcessSummary,
  sendPartsTo,
  WorkerProcess,
} from "./support/analysis-in-parts";
import { DIGITS_CSV, DIGITS_OPTIONS, queueDigitsAnalysis } from "./support/digits-analysis";

const WORKER_ENV = {
  WORKER_HEARTBEAT_MS: "1000",
  WORKER_STALE_AFTER_MS: "20000",
  PARTITA_MEMORY_LIMIT: "1M",
};
let workers: WorkerProcess[] = [];
let boss: PgBoss;

beforeAll(async () => {
  boss = await startBoss({ applicationName: "partita-test", supervise: false, maxConnections: 2 });
  workers = [new WorkerProcess(WORKER_ENV), new WorkerProcess(WORKER_ENV)];
  await Promise.all(workers.map((worker) => worker.waitFor(/\[worker\] ready/)));
});

afterAll(async () => {
  await Promise.all(workers.map((worker) => worker.kill()));
  await boss.stop({ graceful: false });
  await closeDb();
});

describe("an analysis in parts past the workers' memory limit", () => {
  it("keeps each part's rows in a scratch file, with the one-process summary to 1e-9", async () => {
    const job = await queueDigitsAnalysis();
    const run = await runAnalysis(job, { willRetry: true, parts: sendPartsTo(boss, 2) });
    expect(run.outcome).toBe("succeeded");
    const [report] = await db().select().from(reports).where(eq(reports.analysisId, job.analysisId));
    const oneProcess = await analyzePartition({
      data: Readable.from([Buffer.from(DIGITS_CSV, "utf8")]),
      dataName: "digits.csv",
      options: DIGITS_OPTIONS,
      threads: 1,
    });
    expectOneProcessSummary(report.summary, oneProcess);
    // The parts these worker processes held (under `npm test` the suite's own worker, whose limit
    // is the default, may hold one) kept their rows in a scratch file, and the report page says
    // so, in the words of a one-process run past the limit.
    const output = workers.map((worker) => worker.output).join("\n");
    const heldHere = [1, 2].filter((part) =>
      output.includes(`analysis ${job.analysisId}, part ${part} of 2: read`),
    );
    expect(heldHere.length).toBeGreaterThan(0);
    for (const part of heldHere) {
      expect(output).toContain(
        `analysis ${job.analysisId}, part ${part} of 2: rows kept in a scratch file past the memory limit (1 MB)`,
      );
    }
    const parts = await listAnalysisParts(job.analysisId);
    expect(describeRun({ parts, rowsSpilledAtLimit: null, readWholeBecause: null })).toEqual([
      expect.stringMatching(/^Read in 2 parts, each by whichever worker took it/),
      ...heldHere.map(
        (part) =>
          `The rows of part ${part} of 2 did not fit its worker's memory limit (1 MB): they were kept in a scratch file on that worker's disk and read back for each pass. The figures are those an analysis in memory gives.`,
      ),
    ]);
  }, 600_000);
});
