// One analysis shared by several workers, end to end: the analysis's job (run here, as the worker
// runs it) cuts the stored CSV into parts, each part a pg-boss job taken by a worker process
// (scripts/worker.ts, spawned here; under `npm test` the suite's own worker may take one too), and
// merges the parts' digests (methods.md §9). The outside check: the report's summary equals the
// engine's one-process analysis of the same bytes to 1e-9 relative — §9's defining identity, the
// one-process analysis being checked against scikit-learn elsewhere. The data is scikit-learn's
// bundled digits stacked 23 times (41 331 rows, more than the fit's 2 × 20 000-row subsample, so
// the subsample spans parts), with a seeded label-skewed shard column.
import { Readable } from "node:stream";
import { gzipSync } from "node:zlib";
import { eq } from "drizzle-orm";
import PgBoss from "pg-boss";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { findRunCircumstances } from "@/db/queries/analyses";
import { listAnalysisParts } from "@/db/queries/analysis-parts";
import { analysisParts, reports } from "@/db/schema";
import { analyzePartition, type PartitionSummary } from "@/lib/analysis";
import { startBoss } from "@/lib/jobs";
import { describeRun } from "@/lib/reports/run-notes";
import { runAnalysis } from "@/lib/reports/run-analysis";
import {
  expectOneProcessSummary,
  sendPartsTo,
  WorkerProcess,
} from "./support/analysis-in-parts";
import { writeCsvAsParquet } from "../analysis/support/parquet-table";
import { DIGITS_CSV, DIGITS_OPTIONS, queueDigitsAnalysis } from "./support/digits-analysis";

const OPTIONS = DIGITS_OPTIONS;
const CSV = DIGITS_CSV;

// Heartbeats every second; a part silent for 20 s counts as lost — longer than the 10 s between
// the heartbeats of the suite's own worker, whose runs must never count as lost.
const WORKER_ENV = { WORKER_HEARTBEAT_MS: "1000", WORKER_STALE_AFTER_MS: "20000" };
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

const partsSettings = (parts: number) => sendPartsTo(boss, parts);

async function storedSummary(analysisId: string): Promise<PartitionSummary> {
  const stored = await db().select().from(reports).where(eq(reports.analysisId, analysisId));
  expect(stored).toHaveLength(1);
  return stored[0].summary;
}

let oneProcess: Promise<PartitionSummary> | undefined;
/** The engine's analysis of the same bytes in this process, on one thread. */
function analyzeInOneProcess(): Promise<PartitionSummary> {
  oneProcess ??= analyzePartition({
    data: Readable.from([Buffer.from(CSV, "utf8")]),
    dataName: "digits.csv",
    options: OPTIONS,
    threads: 1,
  });
  return oneProcess;
}

describe("one analysis shared by several workers", () => {
  it("gives the one-process summary to 1e-9, with each part a job a worker took", async () => {
    const job = await queueDigitsAnalysis();
    const run = await runAnalysis(job, { willRetry: true, parts: partsSettings(3) });
    expect(run.outcome).toBe("succeeded");
    expectOneProcessSummary(await storedSummary(job.analysisId), await analyzeInOneProcess());
    // Each worker process held one part (a worker holds one at a time).
    for (const worker of workers) {
      expect(worker.output).toMatch(new RegExp(`analysis ${job.analysisId}, part \\d of 3: read`));
    }
    // The report page says it ran in parts, and that none was redone.
    expect(describeRun({ parts: await listAnalysisParts(job.analysisId), rowsSpilledAtLimit: null, readWholeBecause: null })).toEqual([
      expect.stringMatching(/^Read in 3 parts, each by whichever worker took it/),
    ]);
  }, 600_000);

  it("names the file's row of a bad value in a later part, as a one-process read does", async () => {
    // A value too large for a double on data row 40 000 (0-based, header excluded), in the last
    // third of the file's bytes: part 3 of 3 meets it, and counts the rows before it to name it.
    const badRow = 40_000;
    const lines = CSV.split("\n");
    const column = "pixel_3_5";
    const fields = lines[badRow + 1].split(",");
    fields[lines[0].split(",").indexOf(column)] = "1e999";
    lines[badRow + 1] = fields.join(",");
    const badCsv = lines.join("\n");
    const inParts = await queueDigitsAnalysis(badCsv);
    const partsRun = await runAnalysis(inParts, { willRetry: true, parts: partsSettings(3) });
    const oneProcessRun = await runAnalysis(await queueDigitsAnalysis(badCsv), {
      willRetry: true,
      parts: partsSettings(1),
    });
    expect(oneProcessRun).toEqual({
      outcome: "failed",
      message: expect.stringContaining(
        `digits.csv, data row ${badRow} (0-based, header excluded; line ${badRow + 2}), column "${column}": the value "1e999" is too large`,
      ),
    });
    expect(partsRun).toEqual(oneProcessRun);
    // It did run in parts, and the third part is the one that met the value.
    const failures = await db()
      .select({ partIndex: analysisParts.partIndex, failure: analysisParts.failureMessage })
      .from(analysisParts)
      .where(eq(analysisParts.analysisId, inParts.analysisId))
      .orderBy(analysisParts.partIndex);
    expect(failures).toEqual([
      { partIndex: 0, failure: null },
      { partIndex: 1, failure: null },
      { partIndex: 2, failure: oneProcessRun.outcome === "failed" ? oneProcessRun.message : "" },
    ]);
  }, 600_000);

  it("leaves a column with a value that is not a number to one process, which judges it", async () => {
    // A word among the numbers of a pixel column, in part 3 of 3: whether the column is numeric
    // with a bad value or a category is decided over all its values (methods.md §1's 95% rule),
    // so the analysis is read whole, with the one-process outcome.
    const badRow = 40_000;
    const lines = CSV.split("\n");
    const column = "pixel_3_5";
    const fields = lines[badRow + 1].split(",");
    fields[lines[0].split(",").indexOf(column)] = "abc";
    lines[badRow + 1] = fields.join(",");
    const badCsv = lines.join("\n");
    const inParts = await queueDigitsAnalysis(badCsv);
    const partsRun = await runAnalysis(inParts, { willRetry: true, parts: partsSettings(3) });
    const oneProcessRun = await runAnalysis(await queueDigitsAnalysis(badCsv), {
      willRetry: true,
      parts: partsSettings(1),
    });
    expect(oneProcessRun).toEqual({
      outcome: "failed",
      message: expect.stringContaining(
        `digits.csv, data row ${badRow} (0-based, header excluded; line ${badRow + 2}), column "${column}": 1 of the column's`,
      ),
    });
    expect(partsRun).toEqual(oneProcessRun);
    const circumstances = await findRunCircumstances(inParts.workspaceId, inParts.analysisId);
    expect(circumstances.readWholeBecause).toBe(
      `column "${column}" mixes numbers with other values, which only a read of all the rows can judge`,
    );
  }, 600_000);

  it("shares a dataset with a text column of many values, left out as one process leaves it", async () => {
    // Methods.md §1: a text column with more than 32 distinct values is left out with a warning.
    // Every part meets more than 32 of the column's 50 values, so none can list them all; the
    // parts' counts of numbers and other values tell it is text, not a numeric column with a few
    // bad values, so the analysis stays shared.
    const lines = CSV.trimEnd().split("\n");
    const withNotes = `${lines.map((line, k) => `${line},${k === 0 ? "note" : `note ${k % 50}`}`).join("\n")}\n`;
    const options = { labelColumn: "digit", shardColumn: "shard" };
    const job = await queueDigitsAnalysis(withNotes, "digits.csv", options);
    const run = await runAnalysis(job, { willRetry: true, parts: partsSettings(3) });
    expect(run.outcome).toBe("succeeded");
    const expected = await analyzePartition({
      data: Readable.from([Buffer.from(withNotes, "utf8")]),
      dataName: "digits.csv",
      options,
      threads: 1,
    });
    expect(expected.preprocessing.warnings).toContain(
      'column "note" is not numeric and has more than 32 distinct values; it was left out',
    );
    expectOneProcessSummary(await storedSummary(job.analysisId), expected);
    expect(await listAnalysisParts(job.analysisId)).toHaveLength(3);
    const circumstances = await findRunCircumstances(job.workspaceId, job.analysisId);
    expect(circumstances.readWholeBecause).toBeNull();
  }, 600_000);

  it("shares a Parquet dataset by whole row groups, with the CSV's one-process summary", async () => {
    // The same table as Parquet in row groups of 4 000 rows: each part's worker reads the footer
    // and its row groups from storage by byte ranges.
    const job = await queueDigitsAnalysis(writeCsvAsParquet(CSV, 4000), "digits.parquet");
    const run = await runAnalysis(job, { willRetry: true, parts: partsSettings(3) });
    expect(run.outcome).toBe("succeeded");
    expectOneProcessSummary(await storedSummary(job.analysisId), await analyzeInOneProcess());
    for (const worker of workers) {
      expect(worker.output).toMatch(new RegExp(`analysis ${job.analysisId}, part \\d of 3: read`));
    }
  }, 600_000);

  it("reads a gzip file whole, and the report page says why", async () => {
    const job = await queueDigitsAnalysis(gzipSync(CSV), "digits.csv.gz");
    const run = await runAnalysis(job, { willRetry: true, parts: partsSettings(3) });
    expect(run.outcome).toBe("succeeded");
    expectOneProcessSummary(await storedSummary(job.analysisId), await analyzeInOneProcess());
    const parts = await listAnalysisParts(job.analysisId);
    expect(parts).toEqual([]);
    const circumstances = await findRunCircumstances(job.workspaceId, job.analysisId);
    expect(describeRun({ parts, ...circumstances })).toEqual([
      "Read by one worker, not shared among several: the file is gzip-compressed, and compressed data can only be read from its start.",
    ]);
  }, 600_000);

  it("redoes the part of a worker killed in the middle, and ends with one report", async () => {
    const job = await queueDigitsAnalysis();
    const run = runAnalysis(job, { willRetry: true, parts: partsSettings(3) });
    // The first worker's part has answered the fit's first evaluation: its rows are read and
    // encoded, and the fit waits on its next answers.
    const [victim, survivor] = workers;
    const [, part] = await victim.waitFor(
      new RegExp(`analysis ${job.analysisId}, part (\\d) of 3: answered evaluate`),
    );
    await victim.kill();
    expect((await run).outcome).toBe("succeeded");
    expect(survivor.output).toMatch(
      new RegExp(`the worker holding part ${part} of 3 stopped; the part goes to another worker`),
    );
    expectOneProcessSummary(await storedSummary(job.analysisId), await analyzeInOneProcess());
    // The report page says what happened.
    expect(describeRun({ parts: await listAnalysisParts(job.analysisId), rowsSpilledAtLimit: null, readWholeBecause: null })).toEqual([
      expect.stringMatching(/^Read in 3 parts/),
      `Part ${part} of 3 was redone after its worker stopped.`,
    ]);
  }, 600_000);

  it("takes back at once the part of a worker stopped with SIGTERM, and ends with one report", async () => {
    // The previous test killed the first worker: a new one takes its place.
    const replacement = new WorkerProcess(WORKER_ENV);
    workers.push(replacement);
    await replacement.waitFor(/\[worker\] ready/);
    const job = await queueDigitsAnalysis();
    const run = runAnalysis(job, { willRetry: true, parts: partsSettings(3) });
    // Whichever worker process answers the fit first is stopped, as an operator stops one.
    const answered = (worker: WorkerProcess) =>
      worker
        .waitFor(new RegExp(`analysis ${job.analysisId}, part (\\d) of 3: answered evaluate`))
        .then(([, part]) => ({ worker, part }));
    const { worker: victim, part } = await Promise.race([answered(workers[1]), answered(replacement)]);
    await victim.kill("SIGTERM");
    expect(victim.output).toMatch(
      new RegExp(`analysis ${job.analysisId}, part ${part} of 3: handed back: this worker is stopping`),
    );
    expect((await run).outcome).toBe("succeeded");
    expectOneProcessSummary(await storedSummary(job.analysisId), await analyzeInOneProcess());
    // Handed back, not found by the sweep of silent workers: no worker counts as lost, and the
    // report page says the part was redone after its worker was stopped.
    const parts = await listAnalysisParts(job.analysisId);
    expect(parts.map((record) => record.workerLosses)).toEqual([0, 0, 0]);
    expect(describeRun({ parts, rowsSpilledAtLimit: null, readWholeBecause: null })).toEqual([
      expect.stringMatching(/^Read in 3 parts/),
      `Part ${part} of 3 was redone after its worker was stopped or failed.`,
    ]);
  }, 600_000);
});

