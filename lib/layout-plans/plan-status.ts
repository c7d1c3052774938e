import type { LayoutPlanProgressView } from "@/db/queries/layout-plans";

/** What the progress page polls: the plan's shared stage and every candidate's state. */
export interface PlanStatusJson {
  title: string;
  status: LayoutPlanProgressView["status"];
  stage: string | null;
  fraction: number;
  failureMessage: string | null;
  candidates: {
    ordinal: number;
    name: string;
    status: LayoutPlanProgressView["status"];
    fraction: number;
    failureMessage: string | null;
  }[];
}

export function toPlanStatusJson(plan: LayoutPlanProgressView): PlanStatusJson {
  return {
    title: plan.title,
    status: plan.status,
    stage: plan.stage,
    fraction: plan.fraction,
    failureMessage: plan.failureMessage,
    candidates: plan.candidates.map((candidate) => ({
      ordinal: candidate.ordinal,
      name: candidate.name,
      status: candidate.status,
      fraction: candidate.fraction,
      failureMessage: candidate.failureMessage,
    })),
  };
}
