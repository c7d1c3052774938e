import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { requireToken } from "@/lib/auth/api-token-guard";
import { completeUpload } from "@/lib/uploads/finish-upload";
import { assertUploadKeyOf } from "@/lib/uploads/issue-upload";
import { readJsonBody } from "@/lib/uploads/read-json-body";
import { completeMultipartSchema } from "@/lib/validation/upload";

/** Assembles a multipart upload from the parts (and ETags) the caller sent. */
export async function POST(request: Request): Promise<Response> {
  return answerApiRequest("complete-upload", async () => {
    const { workspace } = await requireToken(request, "uploadData");
    const { key, uploadId, parts } = completeMultipartSchema.parse(await readJsonBody(request));
    assertUploadKeyOf(workspace.id, key);
    await completeUpload({ key, uploadId, parts });
    return respondWithJson({ key });
  });
}
