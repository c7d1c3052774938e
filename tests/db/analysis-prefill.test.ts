// The queries behind "run again" (?from=<analysisId>) and "revise" (?revise=<reportId>) on the
// new-analysis page, against the real PostgreSQL that `npm test` starts.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import { findAnalysisForForm, findReportAnalysisForForm } from "@/db/queries/analysis-prefill";
import type { PartitionSummary } from "@/lib/analysis";
import { createAccount } from "@/tests/support/accounts";
import { analyzePenguinsWithCli, insertReport } from "@/tests/support/report-fixtures";

let summary: PartitionSummary;
beforeAll(async () => {
  summary = await analyzePenguinsWithCli();
});
afterAll(closeDb);

describe("prefilling the new-analysis form", () => {
  it("reads an analysis and a report's analysis of this workspace, and nothing of another", async () => {
    const author = await createAccount("prefill");
    const { reportId, analysisId } = await insertReport({
      workspaceId: author.workspaceId,
      authorId: author.id,
      summary,
    });
    const fromAnalysis = await findAnalysisForForm(author.workspaceId, analysisId);
    expect(fromAnalysis).toMatchObject({
      title: "Penguins by island",
      layoutFileId: null,
      weightsFileId: null,
      parameters: { labelColumn: "Species", shardColumn: "Island" },
    });
    expect(await findReportAnalysisForForm(author.workspaceId, reportId)).toEqual(fromAnalysis);

    const stranger = await createAccount("prefill-stranger");
    expect(await findAnalysisForForm(stranger.workspaceId, analysisId)).toBeUndefined();
    expect(await findReportAnalysisForForm(stranger.workspaceId, reportId)).toBeUndefined();
    expect(await findReportAnalysisForForm(author.workspaceId, analysisId)).toBeUndefined();
  });
});
