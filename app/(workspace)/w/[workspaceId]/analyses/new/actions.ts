"use server";

import { insertDataFile, type DataFileSummary } from "@/db/queries/data-files";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { requireRole } from "@/lib/auth/guards";
import { env } from "@/lib/env";
import { RuleError } from "@/lib/errors";
import { isUploadKeyOf } from "@/lib/uploads/file-rules";
import { inspectStoredUpload } from "@/lib/uploads/inspect-stored-upload";
import { registerDataFileSchema, type RegisterDataFileInput } from "@/lib/validation/upload";

/**
 * Registers a file the browser uploaded straight to storage: only an object under this workspace's
 * upload prefix that exists and previews cleanly becomes a data file the analysis form can use.
 */
export async function registerDataFile(
  workspaceId: string,
  input: RegisterDataFileInput,
): Promise<ActionResult<DataFileSummary>> {
  try {
    const { user } = await requireRole(workspaceId, "uploadData");
    const { key, name, kind } = registerDataFileSchema.parse(input);
    if (!isUploadKeyOf(workspaceId, key)) {
      throw new RuleError(404, `"${name}" was not uploaded to this workspace.`, "file");
    }
    const stored = await inspectStoredUpload({
      key,
      name,
      kind,
      maxBytes: env().UPLOAD_MAX_BYTES,
    });
    const file = await insertDataFile(workspaceId, {
      kind,
      name,
      objectKey: key,
      uploadedBy: user.id,
      ...stored,
    });
    return succeed(file);
  } catch (error) {
    return failWith(error, "register-data-file");
  }
}
