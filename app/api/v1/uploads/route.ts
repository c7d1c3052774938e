import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { requireToken } from "@/lib/auth/api-token-guard";
import { env } from "@/lib/env";
import { issueUpload } from "@/lib/uploads/issue-upload";
import { readJsonBody } from "@/lib/uploads/read-json-body";
import { createUploadSchema } from "@/lib/validation/upload";

/**
 * Starts an upload, as the browser's upload form does: the file's type, size and emptiness are
 * checked first, then a presigned PUT (or multipart upload) for a fresh key in the workspace.
 */
export async function POST(request: Request): Promise<Response> {
  return answerApiRequest("create-upload", async () => {
    const { workspace } = await requireToken(request, "uploadData");
    const { name, size, kind, contentType } = createUploadSchema.parse(await readJsonBody(request));
    const ticket = await issueUpload({
      workspaceId: workspace.id,
      file: { name, size, contentType },
      kind,
      maxBytes: env().UPLOAD_MAX_BYTES,
    });
    return respondWithJson(ticket, 201);
  });
}
