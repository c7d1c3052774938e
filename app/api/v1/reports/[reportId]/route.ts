import { findReportSummary } from "@/db/queries/reports";
import { answerApiRequest } from "@/lib/api/respond";
import { reportPathSchema } from "@/lib/api/schemas";
import { requireToken } from "@/lib/auth/api-token-guard";
import { RuleError } from "@/lib/errors";
import { serializeReportSummary } from "@/lib/reports/summary-json";

type Context = { params: Promise<{ reportId: string }> };

/**
 * The report's JSON summary: the same bytes as the report page's export, and the local CLI's output
 * for the same analysis with the inputs as analysed (files with SHA-256, parameters) appended.
 */
export async function GET(request: Request, { params }: Context): Promise<Response> {
  return answerApiRequest("report-summary", async () => {
    const { workspace } = await requireToken(request, "readWorkspace");
    const { reportId } = reportPathSchema.parse(await params);
    const report = await findReportSummary(workspace.id, reportId);
    if (!report) throw new RuleError(404, "There is no such report in this workspace.");
    return new Response(serializeReportSummary(report), {
      headers: { "Content-Type": "application/json; charset=utf-8", "Cache-Control": "no-store" },
    });
  });
}
