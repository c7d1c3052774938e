import { findAnalysisStatus } from "@/db/queries/analyses";
import { requireRole } from "@/lib/auth/guards";
import { RuleError } from "@/lib/errors";
import { respondWithError } from "@/lib/http/handler-errors";
import { toStatusJson } from "@/lib/reports/analysis-status";

type Context = { params: Promise<{ workspaceId: string; analysisId: string }> };

/** The live state of one analysis, polled by its progress page (`AnalysisStatusJson`). */
export async function GET(_request: Request, { params }: Context): Promise<Response> {
  try {
    const { workspaceId, analysisId } = await params;
    await requireRole(workspaceId, "readWorkspace");
    const status = await findAnalysisStatus(workspaceId, analysisId);
    if (!status) throw new RuleError(404, "That analysis does not exist.");
    return Response.json(toStatusJson(status), { headers: { "Cache-Control": "no-store" } });
  } catch (error) {
    return respondWithError(error, "analysis-status");
  }
}
