"use server";

import type { DataFilePreview } from "@/db/schema/analyses";
import { deleteUnusedDataFile, findDataFile } from "@/db/queries/data-files";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { requireRole } from "@/lib/auth/guards";
import { RuleError } from "@/lib/errors";
import { deleteObject } from "@/lib/storage";
import { previewStoredDataset } from "@/lib/uploads/inspect-stored-upload";
import { registerUpload, type RegisteredFile } from "@/lib/uploads/register-upload";
import type { CsvFormatChoice } from "@/lib/analysis/browser";
import { csvFormatChoiceSchema } from "@/lib/validation/analysis-options";
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

/**
 * A dataset's preview read in the encoding, delimiter and decimal mark the user chose on the form,
 * so its columns are those the run will read.
 */
export async function previewDatasetAs(
  workspaceId: string,
  fileId: string,
  choice: CsvFormatChoice,
): Promise<ActionResult<DataFilePreview>> {
  try {
    await requireRole(workspaceId, "uploadData");
    const format = csvFormatChoiceSchema.parse(choice);
    const file = await findDataFile(workspaceId, fileId);
    if (!file || file.kind !== "dataset") {
      throw new RuleError(404, "This dataset is not in the workspace.", "datasetFileId");
    }
    return succeed(await previewStoredDataset(file, format));
  } catch (error) {
    return failWith(error, "preview-dataset-as");
  }
}
