import { findReportSummary } from "@/db/queries/reports";
import { AccessError } from "@/lib/auth/errors";
import { requireRole } from "@/lib/auth/guards";
import { respondWithError } from "@/lib/http/handler-errors";
import { describeDownload, nameExportFile } from "@/lib/reports/export-file-name";
import { serializeReportSummary } from "@/lib/reports/summary-json";

type RouteContext = { params: Promise<{ workspaceId: string; reportId: string }> };

/**
 * The report's summary as stored: the object the engine returned, which is what `npm run analyze`
 * prints for the same input and parameters, serialized the same way, followed by `inputs` (the
 * files with their SHA-256 and the parameters) so the downloaded file stands on its own.
 */
export async function GET(_request: Request, context: RouteContext): Promise<Response> {
  try {
    const { workspaceId, reportId } = await context.params;
    const { workspace } = await requireRole(workspaceId, "readWorkspace");
    const report = await findReportSummary(workspace.id, reportId);
    if (!report) throw new AccessError(404, "That report does not exist in this workspace.");
    return new Response(serializeReportSummary(report), {
      headers: describeDownload(
        nameExportFile(report.title, report.version, "summary.json"),
        "application/json; charset=utf-8",
      ),
    });
  } catch (error) {
    return respondWithError(error, "report summary export");
  }
}
