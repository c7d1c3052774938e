import { listReportPage } from "@/db/queries/reports";
import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { listReportsQuerySchema } from "@/lib/api/schemas";
import { requireToken } from "@/lib/auth/api-token-guard";
import { RuleError } from "@/lib/errors";
import { decodeReportCursor } from "@/lib/reports/report-cursor";

/** The workspace's reports, newest first, a page at a time, optionally filtered by verdict or title. */
export async function GET(request: Request): Promise<Response> {
  return answerApiRequest("list-reports", async () => {
    const { workspace } = await requireToken(request, "readWorkspace");
    const query = Object.fromEntries(new URL(request.url).searchParams);
    const { verdict, q, limit, cursor } = listReportsQuerySchema.parse(query);
    const after = cursor === undefined ? undefined : decodeReportCursor(cursor);
    if (cursor !== undefined && !after) {
      throw new RuleError(422, "cursor must be a nextCursor this API returned.", "cursor");
    }
    const { reports, nextCursor } = await listReportPage(
      workspace.id,
      { verdict, q },
      limit,
      after,
    );
    return respondWithJson({
      reports: reports.map((report) => ({
        id: report.id,
        title: report.title,
        verdict: report.verdict,
        version: report.version,
        latestVersion: report.latestVersion,
        lineageId: report.lineageId,
        createdAt: report.createdAt.toISOString(),
        authorName: report.authorName,
        ratio: report.ratio,
        datasetRows: report.datasetRows,
        shardCount: report.shardCount,
      })),
      nextCursor,
    });
  });
}
