import { Readable } from "node:stream";
import { findLayoutPlan } from "@/db/queries/layout-plans";
import { answerApiRequest } from "@/lib/api/respond";
import { layoutCandidatePathSchema } from "@/lib/api/schemas";
import { requireToken } from "@/lib/auth/api-token-guard";
import { RuleError } from "@/lib/errors";
import { describeDownload } from "@/lib/reports/export-file-name";
import { isFinished } from "@/lib/reports/analysis-status";
import { getObjectStream } from "@/lib/storage";

type Context = { params: Promise<{ planId: string; candidate: string }> };

/**
 * A scored candidate's partition map (`row_id,shard`, methods.md §8) as CSV, under the CLI's file
 * name (e.g. dirichlet-0.5.csv): the analysis reads it back to the candidate's summary.
 */
export async function GET(request: Request, { params }: Context): Promise<Response> {
  return answerApiRequest("layout-candidate-map", async () => {
    const { workspace } = await requireToken(request, "readWorkspace");
    const { planId, candidate: name } = layoutCandidatePathSchema.parse(await params);
    const plan = await findLayoutPlan(workspace.id, planId);
    if (!plan) throw new RuleError(404, "There is no such layout plan in this workspace.");
    const candidate = plan.candidates.find((row) => row.name === name);
    if (!candidate) {
      const names = plan.candidates.map((row) => row.name).join(", ");
      throw new RuleError(404, `The plan has no candidate "${name}" (it has ${names}).`);
    }
    if (!candidate.mapObjectKey) {
      if (!isFinished(candidate.status)) {
        throw new RuleError(409, "The candidate is not scored yet; poll the plan's statusUrl.");
      }
      throw new RuleError(404, `The candidate was not scored (${candidate.status}): no map.`);
    }
    const object = await getObjectStream(candidate.mapObjectKey);
    return new Response(Readable.toWeb(object.body) as ReadableStream, {
      headers: {
        ...describeDownload(`${candidate.name}.csv`, "text/csv; charset=utf-8"),
        "Content-Length": String(object.contentLength),
      },
    });
  });
}
