import type { Metadata } from "next";
import Link from "next/link";
import { buttonClasses } from "@/components/ui/button";
import { listLayoutPlans } from "@/db/queries/layout-plans";
import { guardPage } from "@/lib/auth/page-guard";
import { roleAllows } from "@/lib/auth/roles";
import { formatReportDate } from "@/lib/reports/report-view";

export const metadata: Metadata = { title: "Layout plans" };

const STATUS_LABELS = {
  queued: "Waiting",
  running: "Running",
  succeeded: "Finished",
  failed: "Failed",
  cancelled: "Cancelled",
} as const;

/** The workspace's layout plans, newest first. */
export default async function LayoutPlansPage({
  params,
}: {
  params: Promise<{ workspaceId: string }>;
}) {
  const { workspaceId } = await params;
  const { workspace } = await guardPage(workspaceId, "readWorkspace", `/w/${workspaceId}/layouts`);
  const plans = await listLayoutPlans(workspace.id);
  const canRun = roleAllows(workspace.role, "runAnalysis");
  const base = `/w/${workspace.id}/layouts`;
  return (
    <div className="space-y-6">
      <header className="flex flex-wrap items-end justify-between gap-3">
        <div className="space-y-1">
          <h1 className="text-2xl font-semibold">Layout plans</h1>
          <p className="max-w-prose text-ink-soft">
            Candidate splits of one dataset, each scored with the full analysis and compared.
          </p>
        </div>
        {canRun ? (
          <Link href={`${base}/new`} className={buttonClasses("primary")}>
            Plan layouts
          </Link>
        ) : null}
      </header>
      {plans.length === 0 ? (
        <div className="space-y-2 rounded-md border border-dashed border-ink/20 bg-white p-6">
          <p className="font-medium">No layout plans yet.</p>
          <p className="text-sm text-ink-soft">
            {canRun
              ? "Plan layouts to see which split of a dataset suits your training plan."
              : "Plans that owners and analysts start appear here."}
          </p>
        </div>
      ) : (
        <ul className="divide-y divide-ink/10 rounded-lg border border-ink/10 bg-white">
          {plans.map((plan) => (
            <li key={plan.id} className="flex flex-wrap items-baseline justify-between gap-2 p-4">
              <div className="min-w-0">
                <Link
                  className="font-medium break-words hover:underline"
                  href={
                    plan.status === "succeeded"
                      ? `${base}/${plan.id}/compare`
                      : `${base}/${plan.id}`
                  }
                >
                  {plan.title}
                </Link>
                <p className="text-sm text-ink-soft">
                  {plan.datasetName} · {plan.shardCount} shards · {plan.scored} of {plan.candidates}{" "}
                  candidates scored
                </p>
              </div>
              <p className="text-sm text-ink-soft">
                {STATUS_LABELS[plan.status]} · {formatReportDate(plan.createdAt)}
              </p>
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
