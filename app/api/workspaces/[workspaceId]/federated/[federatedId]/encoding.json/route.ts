import { requireRole } from "@/lib/auth/guards";
import { getFederatedStatus, readClientEncoding } from "@/lib/federated";
import { respondWithError } from "@/lib/http/handler-errors";
import { describeDownload } from "@/lib/reports/export-file-name";

type RouteContext = { params: Promise<{ workspaceId: string; federatedId: string }> };

/**
 * The merged round 1 of a federated analysis as the file an offline client passes to
 * `npm run digest -- gradients --encoding encoding.json`, written as the CLI writes it.
 * 409 while round 1 is open.
 */
export async function GET(_request: Request, context: RouteContext): Promise<Response> {
  try {
    const { workspaceId, federatedId } = await context.params;
    const { workspace } = await requireRole(workspaceId, "runAnalysis");
    // Reads the analysis through the workspace: another workspace's answers 404.
    const status = await getFederatedStatus(workspace.id, federatedId);
    const encoding = await readClientEncoding({ analysisId: status.id });
    return new Response(`${JSON.stringify(encoding, null, 2)}\n`, {
      headers: describeDownload("encoding.json", "application/json; charset=utf-8"),
    });
  } catch (error) {
    return respondWithError(error, "federated encoding download");
  }
}
