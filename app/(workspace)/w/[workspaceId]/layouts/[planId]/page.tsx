import type { Metadata } from "next";
import Link from "next/link";
import { PlanProgressPanel } from "@/components/layouts/plan-progress-panel";
import { roleAllows } from "@/lib/auth/roles";
import { toPlanStatusJson } from "@/lib/layout-plans/plan-status";
import { cancelPlan } from "../actions";
import { describePlanInput, loadPlanPage, type PlanPageParams } from "./load-plan";

export const metadata: Metadata = { title: "Layout plan" };

/** One layout plan while it runs and after: progress per candidate, cancel, the comparison. */
export default async function LayoutPlanPage({ params }: { params: PlanPageParams }) {
  const { workspace, plan } = await loadPlanPage(params);
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
        <p className="text-sm text-ink-soft">{describePlanInput(plan)}</p>
      </div>
      <PlanProgressPanel
        workspaceId={workspace.id}
        planId={plan.id}
        initial={toPlanStatusJson(plan)}
        canRun={roleAllows(workspace.role, "runAnalysis")}
        cancelPlan={cancelPlan.bind(null, workspace.id, plan.id)}
      />
    </div>
  );
}
