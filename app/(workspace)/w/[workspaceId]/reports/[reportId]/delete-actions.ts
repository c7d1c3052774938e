"use server";

import { revalidatePath } from "next/cache";
import { z } from "zod";
import { deleteReportLineage, type DeletedReport } from "@/db/queries/report-deletion";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { requireRole } from "@/lib/auth/guards";
import { RuleError } from "@/lib/errors";

const confirmationSchema = z.object({
  confirmTitle: z.string().trim().min(1, "Type the report's title to confirm."),
});

/**
 * Deletes a report with all its versions (owners only). The owner types the title first, as a
 * guard against deleting the wrong report from a page left open; the audit log records who did it.
 */
export async function deleteReport(
  workspaceId: string,
  reportId: string,
  input: { confirmTitle: string },
): Promise<ActionResult<DeletedReport>> {
  try {
    const { user, workspace } = await requireRole(workspaceId, "deleteReport");
    const { confirmTitle } = confirmationSchema.parse(input);
    const deleted = await deleteReportLineage(workspace.id, reportId, user, confirmTitle);
    if (!deleted) throw new RuleError(404, "That report does not exist.");
    revalidatePath(`/w/${workspace.id}/reports`);
    return succeed(deleted);
  } catch (error) {
    return failWith(error, "delete-report");
  }
}
