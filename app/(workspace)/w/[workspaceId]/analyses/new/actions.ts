"use server";

import type { DataFileSummary } from "@/db/queries/data-files";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { requireRole } from "@/lib/auth/guards";
import { registerUpload } from "@/lib/uploads/register-upload";
import type { RegisterDataFileInput } from "@/lib/validation/upload";

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
    return succeed(await registerUpload(workspaceId, user.id, input));
  } catch (error) {
    return failWith(error, "register-data-file");
  }
}
