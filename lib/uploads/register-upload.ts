import "server-only";
import { insertDataFile, type DataFileSummary } from "@/db/queries/data-files";
import { env } from "@/lib/env";
import { RuleError } from "@/lib/errors";
import { registerDataFileSchema, type RegisterDataFileInput } from "@/lib/validation/upload";
import { isUploadKeyOf } from "./file-rules";
import { inspectStoredUpload } from "./inspect-stored-upload";
import { quoteValue } from "@/lib/analysis/quote-value";

/**
 * Registers a file uploaded straight to storage, for the upload form and the API alike: only an
 * object under this workspace's upload prefix that exists and previews cleanly becomes a data
 * file an analysis can read. The caller has checked that `userId` may upload here.
 */
export async function registerUpload(
  workspaceId: string,
  userId: string,
  input: RegisterDataFileInput,
): Promise<DataFileSummary> {
  const { key, name, kind } = registerDataFileSchema.parse(input);
  if (!isUploadKeyOf(workspaceId, key)) {
    throw new RuleError(404, `${quoteValue(name)} was not uploaded to this workspace.`, "file");
  }
  const stored = await inspectStoredUpload({
    key,
    name,
    kind,
    maxBytes: env().UPLOAD_MAX_BYTES,
  });
  return insertDataFile(workspaceId, {
    kind,
    name,
    objectKey: key,
    uploadedBy: userId,
    ...stored,
  });
}
