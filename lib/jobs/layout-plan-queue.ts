import { z } from "zod";

/** The pg-boss queue of layout plans (methods.md §8), beside the analyses' queue. */
export const LAYOUT_PLAN_QUEUE = "layout-plan";

/**
 * Retries and expiry of a plan job. A plan scores all its candidates in one job (the dataset is
 * read and encoded once), so it holds a worker about as long as several analyses. A worker that
 * dies is noticed by its missing heartbeats (lib/reports/lost-runs.ts) and its plan handed back
 * within a minute or so, to go on from the candidates already scored; the expiry is only the
 * backstop, long enough that a healthy plan on a large dataset is never started a second time.
 */
export const LAYOUT_PLAN_JOB_POLICY = {
  retryLimit: 1,
  retryDelay: 15,
  retryBackoff: true,
  expireInSeconds: 6 * 60 * 60,
} as const;

/** What a plan job carries: the plan to run, and its workspace (every query is scoped by it). */
export const layoutPlanJobSchema = z.object({
  planId: z.string().min(1),
  workspaceId: z.string().min(1),
});

export type LayoutPlanJob = z.infer<typeof layoutPlanJobSchema>;
