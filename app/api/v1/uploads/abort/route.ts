import { answerApiRequest } from "@/lib/api/respond";
import { requireToken } from "@/lib/auth/api-token-guard";
import { cancelUpload } from "@/lib/uploads/finish-upload";
import { assertUploadKeyOf } from "@/lib/uploads/issue-upload";
import { readJsonBody } from "@/lib/uploads/read-json-body";
import { abortMultipartSchema } from "@/lib/validation/upload";

/** Drops a cancelled or failed multipart upload and the parts stored so far. */
export async function POST(request: Request): Promise<Response> {
  return answerApiRequest("abort-upload", async () => {
    const { workspace } = await requireToken(request, "uploadData");
    const { key, uploadId } = abortMultipartSchema.parse(await readJsonBody(request));
    assertUploadKeyOf(workspace.id, key);
    await cancelUpload({ key, uploadId });
    return new Response(null, { status: 204 });
  });
}
