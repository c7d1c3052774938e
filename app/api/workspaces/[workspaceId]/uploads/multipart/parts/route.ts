import { requireRole } from "@/lib/auth/guards";
import { respondWithError } from "@/lib/http/handler-errors";
import { assertUploadKeyOf, signParts } from "@/lib/uploads/issue-upload";
import { readJsonBody } from "@/lib/uploads/read-json-body";
import { signPartsSchema } from "@/lib/validation/upload";

type Context = { params: Promise<{ workspaceId: string }> };

/** Fresh part URLs for a long multipart upload whose first URLs are about to expire. */
export async function POST(request: Request, { params }: Context): Promise<Response> {
  try {
    const { workspaceId } = await params;
    await requireRole(workspaceId, "uploadData");
    const { key, uploadId, partNumbers } = signPartsSchema.parse(await readJsonBody(request));
    assertUploadKeyOf(workspaceId, key);
    const parts = await signParts(key, uploadId, partNumbers);
    return Response.json({ parts }, { headers: { "Cache-Control": "no-store" } });
  } catch (error) {
    return respondWithError(error, "sign-upload-parts");
  }
}
