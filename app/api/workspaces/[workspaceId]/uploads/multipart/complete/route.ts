import { requireRole } from "@/lib/auth/guards";
import { respondWithError } from "@/lib/http/handler-errors";
import { completeUpload } from "@/lib/uploads/finish-upload";
import { assertUploadKeyOf } from "@/lib/uploads/issue-upload";
import { readJsonBody } from "@/lib/uploads/read-json-body";
import { completeMultipartSchema } from "@/lib/validation/upload";

type Context = { params: Promise<{ workspaceId: string }> };

/** Assembles a multipart upload from the parts (and ETags) the browser reports. */
export async function POST(request: Request, { params }: Context): Promise<Response> {
  try {
    const { workspaceId } = await params;
    await requireRole(workspaceId, "uploadData");
    const { key, uploadId, parts } = completeMultipartSchema.parse(await readJsonBody(request));
    assertUploadKeyOf(workspaceId, key);
    await completeUpload({ key, uploadId, parts });
    return Response.json({ key });
  } catch (error) {
    return respondWithError(error, "complete-upload");
  }
}
