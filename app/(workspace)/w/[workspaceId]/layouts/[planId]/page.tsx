import type { Metadata } from "next";
import Link from "next/link";
import { notFound } from "next/navigation";
import { PlanProgressPanel } from "@/components/layouts/plan-progress-panel";
import { findLayoutPlan } from "@/db/queries/layout-plans";
import { guardPage } from "@/lib/auth/page-guard";
import { roleAllows } from "@/lib/auth/roles";
import { toPlanStatusJson } from "@/lib/layout-plans/plan-status";

export const metadata: Metadata = { title: "Layout plan" };

/** One layout plan while it runs and after: progress per candidate, cancel, the comparison. */
export default async function LayoutPlanPage({
  params,
}: {
  params: Promise<{ workspaceId: string; planId: string }>;
}) {
  const { workspaceId, planId } = await params;
  const { workspace } = await guardPage(
    workspaceId,
    "readWorkspace",
    `/w/${workspaceId}/layouts/${planId}`,
  );
  const plan = await findLayoutPlan(workspace.id, planId);
  if (!plan) notFound();
  return (
    <div className="mx-auto max-w-3xl space-y-6">
      <div className="space-y-1">
        <p className="text-sm text-ink-soft">
          <Link className="hover:underline" href={`/w/${workspace.id}/layouts`}>
            Layout plans
          </Link>{" "}
          / Plan
        </p>
        <h1 className="text-2xl font-semibold tracking-tight break-words">{plan.title}</h1>
        <p className="text-sm text-ink-soft">
          {plan.datasetName} into {plan.shardCount} shards
          {plan.groupColumn ? `, groups by ${plan.groupColumn}` : ""}, seed {plan.seed}
        </p>
      </div>
      <PlanProgressPanel
        workspaceId={workspace.id}
        planId={planId}
        initial={toPlanStatusJson(plan)}
        canRun={roleAllows(workspace.role, "runAnalysis")}
      />
    </div>
  );
}
