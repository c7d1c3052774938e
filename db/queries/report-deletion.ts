import "server-only";
import { and, eq, inArray, or } from "drizzle-orm";
import { db } from "@/db/client";
import { analyses, reports } from "@/db/schema";
import { RuleError } from "@/lib/errors";
import { recordAudit } from "./audit";

export interface DeletedReport {
  title: string;
  versions: number[];
}

/**
 * Deletes a report with every version of its lineage, together with their per-shard tables,
 * review requests, comments and decisions (cascades) and the analyses that produced them, and
 * records the deletion in the audit log in the same transaction. The whole lineage goes because a
 * version on its own cannot leave: later versions number themselves after it and re-runs point
 * at it. Refused while a re-run of the report is queued or running, since the worker would then
 * store a version into a lineage that no longer exists. The uploaded files stay: other reports
 * may have been made from them. Refused unless `confirmTitle` is the title of the report named,
 * the user's guard against deleting the wrong one. Returns undefined when the report is not in the
 * workspace.
 */
export async function deleteReportLineage(
  workspaceId: string,
  reportId: string,
  actor: { id: string; email: string },
  confirmTitle: string,
): Promise<DeletedReport | undefined> {
  return db().transaction(async (tx) => {
    const [target] = await tx
      .select({ lineageId: reports.lineageId, title: reports.title })
      .from(reports)
      .where(and(eq(reports.workspaceId, workspaceId), eq(reports.id, reportId)));
    if (!target) return undefined;
    if (target.title !== confirmTitle) {
      throw new RuleError(422, `Type the title exactly: ${target.title}`, "confirmTitle");
    }

    const versions = await tx
      .select({
        id: reports.id,
        version: reports.version,
        title: reports.title,
        analysisId: reports.analysisId,
      })
      .from(reports)
      .where(and(eq(reports.workspaceId, workspaceId), eq(reports.lineageId, target.lineageId)))
      .orderBy(reports.version)
      .for("update");
    const versionIds = versions.map((version) => version.id);

    const revisions = await tx
      .select({ id: analyses.id, status: analyses.status })
      .from(analyses)
      .where(
        and(eq(analyses.workspaceId, workspaceId), inArray(analyses.previousReportId, versionIds)),
      )
      .for("update");
    if (revisions.some(({ status }) => status === "queued" || status === "running")) {
      throw new RuleError(
        409,
        "A re-run of this report is still queued or running. Cancel it or wait for it to finish, then delete the report.",
      );
    }

    await tx.delete(reports).where(inArray(reports.id, versionIds));
    await tx.delete(analyses).where(
      and(
        eq(analyses.workspaceId, workspaceId),
        or(
          inArray(
            analyses.id,
            versions.map((version) => version.analysisId),
          ),
          inArray(analyses.previousReportId, versionIds),
        ),
      ),
    );

    const latest = versions[versions.length - 1];
    const deleted = { title: latest.title, versions: versions.map((version) => version.version) };
    await recordAudit(
      {
        workspaceId,
        actor,
        action: "report.deleted",
        targetType: "report",
        targetId: target.lineageId,
        details: deleted,
      },
      tx,
    );
    return deleted;
  });
}
