import "server-only";
import { notFound } from "next/navigation";
import { findLayoutPlan, type LayoutPlanView } from "@/db/queries/layout-plans";
import { guardPage } from "@/lib/auth/page-guard";

export type PlanPageParams = Promise<{ workspaceId: string; planId: string }>;

/**
 * What every page of one layout plan starts with: the page guard (reading the workspace; the
 * sign-in redirect comes back to `/layouts/{planId}{subpath}`) and the plan, or a 404 when this
 * workspace has none by that id.
 */
export async function loadPlanPage(params: PlanPageParams, subpath = "") {
  const { workspaceId, planId } = await params;
  const { workspace } = await guardPage(
    workspaceId,
    "readWorkspace",
    `/w/${workspaceId}/layouts/${planId}${subpath}`,
  );
  const plan = await findLayoutPlan(workspace.id, planId);
  if (!plan) notFound();
  return { workspace, plan };
}

/** The line under a plan's title: its dataset, shard count, group column and seed. */
export function describePlanInput(plan: LayoutPlanView): string {
  const groups = plan.groupColumn ? `, groups by ${plan.groupColumn}` : "";
  return `${plan.datasetName} into ${plan.shardCount} shards${groups}, seed ${plan.seed}`;
}
