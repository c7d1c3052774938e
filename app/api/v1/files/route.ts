import { listDataFilePage } from "@/db/queries/data-files";
import { readListPage } from "@/lib/api/list-page";
import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { requireToken } from "@/lib/auth/api-token-guard";
import { registerUpload } from "@/lib/uploads/register-upload";
import { readJsonBody } from "@/lib/uploads/read-json-body";
import { registerDataFileSchema } from "@/lib/validation/upload";

/**
 * Registers an uploaded object as a dataset, layout (partition map) or reference weights file,
 * after the server has read it back from storage; the answer's id goes into POST /api/v1/analyses.
 * Bytes already registered as a file of the same kind give that file back (200, `reused`).
 */
export async function POST(request: Request): Promise<Response> {
  return answerApiRequest("register-file", async () => {
    const { user, workspace } = await requireToken(request, "uploadData");
    const input = registerDataFileSchema.parse(await readJsonBody(request));
    const file = await registerUpload(workspace.id, user.id, input);
    // The same bytes are already a file here: that one is the answer, and nothing new was made.
    return respondWithJson(file, file.reused ? 200 : 201);
  });
}

/** The workspace's registered files, newest first, a page at a time (cursor paging). */
export async function GET(request: Request): Promise<Response> {
  return answerApiRequest("list-files", async () => {
    const { workspace } = await requireToken(request, "readWorkspace");
    const { limit, after } = readListPage(request);
    const { files, nextCursor } = await listDataFilePage(workspace.id, limit, after);
    return respondWithJson({
      files: files.map((file) => ({ ...file, createdAt: file.createdAt.toISOString() })),
      nextCursor,
    });
  });
}
