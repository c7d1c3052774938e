import { findReportShardTable } from "@/db/queries/reports";
import { AccessError } from "@/lib/auth/errors";
import { requireRole } from "@/lib/auth/guards";
import { respondWithError } from "@/lib/http/handler-errors";
import { formatShardsCsv } from "@/lib/reports/csv-export";
import { describeDownload, nameExportFile } from "@/lib/reports/export-file-name";

type RouteContext = { params: Promise<{ workspaceId: string; reportId: string }> };

/** The per-shard table as CSV, with shard ids made safe to open in a spreadsheet. */
export async function GET(_request: Request, context: RouteContext): Promise<Response> {
  try {
    const { workspaceId, reportId } = await context.params;
    const { workspace } = await requireRole(workspaceId, "readWorkspace");
    const table = await findReportShardTable(workspace.id, reportId);
    if (!table) throw new AccessError(404, "That report does not exist in this workspace.");
    // A byte order mark, so spreadsheets read the headings' symbols (σₘ², ‖gₘ‖²) as UTF-8.
    return new Response(`\uFEFF${formatShardsCsv(table.shards, table.task)}\r\n`, {
      headers: describeDownload(
        nameExportFile(table.title, table.version, "shards.csv"),
        "text/csv; charset=utf-8",
      ),
    });
  } catch (error) {
    return respondWithError(error, "report shards export");
  }
}
