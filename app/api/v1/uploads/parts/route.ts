import { answerApiRequest, respondWithJson } from "@/lib/api/respond";
import { requireToken } from "@/lib/auth/api-token-guard";
import { assertUploadKeyOf, signParts } from "@/lib/uploads/issue-upload";
import { readJsonBody } from "@/lib/uploads/read-json-body";
import { signPartsSchema } from "@/lib/validation/upload";

/** Fresh part URLs for a long multipart upload whose first URLs are about to expire. */
export async function POST(request: Request): Promise<Response> {
  return answerApiRequest("sign-upload-parts", async () => {
    const { workspace } = await requireToken(request, "uploadData");
    const { key, uploadId, partNumbers } = signPartsSchema.parse(await readJsonBody(request));
    assertUploadKeyOf(workspace.id, key);
    return respondWithJson({ parts: await signParts(key, uploadId, partNumbers) });
  });
}
