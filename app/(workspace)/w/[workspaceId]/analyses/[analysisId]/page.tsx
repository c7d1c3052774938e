import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { ProgressPanel } from "@/components/analyses/progress-panel";
import { findAnalysisStatus } from "@/db/queries/analyses";
import { guardPage } from "@/lib/auth/page-guard";
import { roleAllows } from "@/lib/auth/roles";
import { toStatusJson } from "@/lib/reports/analysis-status";
import { cancelAnalysis } from "../actions";

export const metadata: Metadata = { title: "Analysis" };

/** One analysis while it runs and after: live progress, cancel, and where to go next. */
export default async function AnalysisPage({
  params,
}: {
  params: Promise<{ workspaceId: string; analysisId: string }>;
}) {
  const { workspaceId, analysisId } = await params;
  const { workspace } = await guardPage(
    workspaceId,
    "readWorkspace",
    `/w/${workspaceId}/analyses/${analysisId}`,
  );
  const status = await findAnalysisStatus(workspace.id, analysisId);
  if (!status) notFound();
  return (
    <div className="mx-auto max-w-3xl space-y-6">
      <div className="space-y-1">
        <p className="text-sm text-ink-soft">
          <Link className="hover:underline" href={`/w/${workspace.id}/reports`}>
            Reports
          </Link>{" "}
          / Analysis
        </p>
        <h1 className="text-2xl font-semibold tracking-tight break-words">{status.title}</h1>
      </div>
      <ProgressPanel
        workspaceId={workspace.id}
        analysisId={analysisId}
        initial={toStatusJson(status)}
        canRun={roleAllows(workspace.role, "runAnalysis")}
        cancelAnalysis={cancelAnalysis.bind(null, workspace.id, analysisId)}
      />
    </div>
  );
}
