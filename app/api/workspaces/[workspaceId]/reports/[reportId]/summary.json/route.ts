import { findReportSummary } from "@/db/queries/reports";
import { AccessError } from "@/lib/auth/errors";
import { requireRole } from "@/lib/auth/guards";
import { respondWithError } from "@/lib/http/handler-errors";
import { describeDownload, nameExportFile } from "@/lib/reports/export-file-name";
import { serializeSummary } from "@/lib/reports/summary-json";

type RouteContext = { params: Promise<{ workspaceId: string; reportId: string }> };

/**
 * The report's summary exactly as stored: the object the engine returned, which is what
 * `npm run analyze` prints for the same input and parameters, serialized the same way.
 */
export async function GET(_request: Request, context: RouteContext): Promise<Response> {
  try {
    const { workspaceId, reportId } = await context.params;
    const { workspace } = await requireRole(workspaceId, "readWorkspace");
    const report = await findReportSummary(workspace.id, reportId);
    if (!report) throw new AccessError(404, "That report does not exist in this workspace.");
    return new Response(serializeSummary(report.summary), {
      headers: describeDownload(
        nameExportFile(report.title, report.version, "summary.json"),
        "application/json; charset=utf-8",
      ),
    });
  } catch (error) {
    return respondWithError(error, "report summary export");
  }
}
