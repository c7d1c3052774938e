import "server-only";
import { findSameContents, insertDataFile, type DataFileSummary } from "@/db/queries/data-files";
import { quoteValue } from "@/lib/analysis/browser";
import { env } from "@/lib/env";
import { RuleError } from "@/lib/errors";
import { openHashedObject } from "@/lib/reports/hashed-object";
import { deleteObject } from "@/lib/storage";
import { registerDataFileSchema, type RegisterDataFileInput } from "@/lib/validation/upload";
import { isUploadKeyOf } from "./file-rules";
import { inspectStoredUpload } from "./inspect-stored-upload";

/** A registered file, and whether it is one already here that the upload turned out to repeat. */
export type RegisteredFile = DataFileSummary & { reused: boolean };

/**
 * Registers a file uploaded straight to storage, for the upload form and the API alike: only an
 * object under this workspace's upload prefix that exists and previews cleanly becomes a data
 * file an analysis can read. Its bytes are read back once for their SHA-256: when a file of the
 * same kind with the same bytes is already in the workspace, the new object is removed and that
 * file is returned (`reused`), so the same upload made four times is one file. The caller has
 * checked that `userId` may upload here.
 */
export async function registerUpload(
  workspaceId: string,
  userId: string,
  input: RegisterDataFileInput,
): Promise<RegisteredFile> {
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
  const { sha256 } = await digestStoredObject({
    kind,
    name,
    objectKey: key,
    sizeBytes: stored.sizeBytes,
  });
  const earlier = await findSameContents(workspaceId, { kind, sha256, objectKey: key });
  if (earlier) {
    await deleteObject(key);
    return { ...earlier, reused: true };
  }
  const file = await insertDataFile(workspaceId, {
    kind,
    name,
    objectKey: key,
    uploadedBy: userId,
    sha256,
    ...stored,
  });
  return { ...file, reused: false };
}

/** Reads a stored object to its end for its size and SHA-256, as the analysis will hash it. */
async function digestStoredObject(file: Parameters<typeof openHashedObject>[0]) {
  const object = openHashedObject(file);
  for await (const chunk of object.stream) void chunk;
  return object.describe();
}
