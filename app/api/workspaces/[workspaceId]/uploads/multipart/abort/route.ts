import { requireRole } from "@/lib/auth/guards";
import { respondWithError } from "@/lib/http/handler-errors";
import { cancelUpload } from "@/lib/uploads/finish-upload";
import { assertUploadKeyOf } from "@/lib/uploads/issue-upload";
import { readJsonBody } from "@/lib/uploads/read-json-body";
import { abortMultipartSchema } from "@/lib/validation/upload";

type Context = { params: Promise<{ workspaceId: string }> };

/** Drops a cancelled or failed multipart upload and the parts stored so far. */
export async function POST(request: Request, { params }: Context): Promise<Response> {
  try {
    const { workspaceId } = await params;
    await requireRole(workspaceId, "uploadData");
    const { key, uploadId } = abortMultipartSchema.parse(await readJsonBody(request));
    assertUploadKeyOf(workspaceId, key);
    await cancelUpload({ key, uploadId });
    return new Response(null, { status: 204 });
  } catch (error) {
    return respondWithError(error, "abort-upload");
  }
}
