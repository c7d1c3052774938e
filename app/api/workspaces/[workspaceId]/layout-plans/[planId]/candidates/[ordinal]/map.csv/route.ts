import { Readable } from "node:stream";
import { findLayoutPlan } from "@/db/queries/layout-plans";
import { AccessError } from "@/lib/auth/errors";
import { requireRole } from "@/lib/auth/guards";
import { respondWithError } from "@/lib/http/handler-errors";
import { describeDownload } from "@/lib/reports/export-file-name";
import { getObjectStream } from "@/lib/storage";

type RouteContext = { params: Promise<{ workspaceId: string; planId: string; ordinal: string }> };

/**
 * A scored candidate's partition map (`row_id,shard`, methods.md §8), streamed from storage under
 * the CLI's file name (e.g. dirichlet-0.5.csv): the analysis reads it back to the same summary.
 */
export async function GET(_request: Request, context: RouteContext): Promise<Response> {
  try {
    const { workspaceId, planId, ordinal } = await context.params;
    const { workspace } = await requireRole(workspaceId, "readWorkspace");
    const plan = await findLayoutPlan(workspace.id, planId);
    const candidate = plan?.candidates.find((row) => String(row.ordinal) === ordinal);
    if (!candidate?.mapObjectKey) {
      throw new AccessError(404, "That layout does not exist in this workspace.");
    }
    const object = await getObjectStream(candidate.mapObjectKey);
    return new Response(Readable.toWeb(object.body) as ReadableStream, {
      headers: {
        ...describeDownload(`${candidate.name}.csv`, "text/csv; charset=utf-8"),
        "Content-Length": String(object.contentLength),
      },
    });
  } catch (error) {
    return respondWithError(error, "layout map export");
  }
}
