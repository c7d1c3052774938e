import { requireRole } from "@/lib/auth/guards";
import { env } from "@/lib/env";
import { respondWithError } from "@/lib/http/handler-errors";
import { issueUpload } from "@/lib/uploads/issue-upload";
import { readJsonBody } from "@/lib/uploads/read-json-body";
import { createUploadSchema } from "@/lib/validation/upload";

type Context = { params: Promise<{ workspaceId: string }> };

/**
 * Starts an upload: checks the file's type, size and emptiness before any byte is sent and answers
 * with a presigned PUT, or a multipart upload with a presigned URL per part, for a fresh key under
 * the workspace's prefix.
 */
export async function POST(request: Request, { params }: Context): Promise<Response> {
  try {
    const { workspaceId } = await params;
    await requireRole(workspaceId, "uploadData");
    const { name, size, kind, contentType } = createUploadSchema.parse(await readJsonBody(request));
    const ticket = await issueUpload({
      workspaceId,
      file: { name, size, contentType },
      kind,
      maxBytes: env().UPLOAD_MAX_BYTES,
    });
    return Response.json(ticket, { status: 201, headers: { "Cache-Control": "no-store" } });
  } catch (error) {
    return respondWithError(error, "create-upload");
  }
}
