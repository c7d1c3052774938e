import { listReports } from "@/db/queries/reports";
import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { listReportsQuerySchema } from "@/lib/api/schemas";
import { requireToken } from "@/lib/auth/api-token-guard";

/** The workspace's reports, newest first, optionally filtered by verdict or title. */
export async function GET(request: Request): Promise<Response> {
  return answerApiRequest("list-reports", async () => {
    const { workspace } = await requireToken(request, "readWorkspace");
    const query = Object.fromEntries(new URL(request.url).searchParams);
    const { verdict, q, limit } = listReportsQuerySchema.parse(query);
    const reports = await listReports(workspace.id, { verdict, q }, limit);
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
    });
  });
}
