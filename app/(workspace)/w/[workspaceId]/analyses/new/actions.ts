"use server";

import { deleteUnusedDataFile } from "@/db/queries/data-files";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { requireRole } from "@/lib/auth/guards";
import { deleteObject } from "@/lib/storage";
import { registerUpload, type RegisteredFile } from "@/lib/uploads/register-upload";
import type { RegisterDataFileInput } from "@/lib/validation/upload";

/**
 * Registers a file the browser uploaded straight to storage: only an object under this workspace's
 * upload prefix that exists and previews cleanly becomes a data file the analysis form can use.
 * The same bytes uploaded again give back the file already here (`reused`).
 */
export async function registerDataFile(
  workspaceId: string,
  input: RegisterDataFileInput,
): Promise<ActionResult<RegisteredFile>> {
  try {
    const { user } = await requireRole(workspaceId, "uploadData");
    return succeed(await registerUpload(workspaceId, user.id, input));
  } catch (error) {
    return failWith(error, "register-data-file");
  }
}

/** Deletes an uploaded file no analysis reads, from the workspace and from storage. */
export async function deleteDataFile(workspaceId: string, fileId: string): Promise<ActionResult> {
  try {
    await requireRole(workspaceId, "uploadData");
    const { objectKey } = await deleteUnusedDataFile(workspaceId, fileId);
    await deleteObject(objectKey);
    return succeed();
  } catch (error) {
    return failWith(error, "delete-data-file");
  }
}
