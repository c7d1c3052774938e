// The report page says when an analysis's rows went to a scratch file: a run under a 1 MiB memory
// limit (set before anything reads the environment) on 41 331 digits rows, whose values alone
// (4.3 MB) are past it, records the limit, and the page's note names it. That the scratch file
// gives the in-memory summary bit for bit is checked in tests/lib/analysis/scratch-design.test.ts.
import { afterAll, describe, expect, it, vi } from "vitest";

vi.hoisted(() => {
  process.env.PARTITA_MEMORY_LIMIT = "1M";
});

import { closeDb } from "@/db/client";
import { listAnalysisParts } from "@/db/queries/analysis-parts";
import { findRunCircumstances } from "@/db/queries/analyses";
import { runAnalysis } from "@/lib/reports/run-analysis";
import { describeRun } from "@/lib/reports/run-notes";
import { queueDigitsAnalysis } from "./support/digits-analysis";

afterAll(closeDb);

describe("how the analysis ran, on the report page", () => {
  it("says the rows went to a scratch file past the memory limit", async () => {
    const job = await queueDigitsAnalysis();
    expect((await runAnalysis(job, { willRetry: true })).outcome).toBe("succeeded");
    const circumstances = await findRunCircumstances(job.workspaceId, job.analysisId);
    expect(circumstances).toEqual({ rowsSpilledAtLimit: 2 ** 20, readWholeBecause: null });
    const parts = await listAnalysisParts(job.analysisId);
    expect(describeRun({ parts, ...circumstances })).toEqual([
      "The rows did not fit the worker's memory limit (1 MB): they were kept in a scratch file on its disk and read back for each pass. The figures are those an analysis in memory gives.",
    ]);
  }, 300_000);

  it("says nothing of a run in one process with its rows in memory", () => {
    expect(describeRun({ parts: [], rowsSpilledAtLimit: null, readWholeBecause: null })).toEqual(
      [],
    );
  });
});
