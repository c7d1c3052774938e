import { z } from "zod";

/** The pg-boss queue every analysis job goes through; all workers sharing a database share it. */
export const ANALYSIS_QUEUE = "analysis";

/**
 * Retries and expiry of an analysis job. A job that throws (an internal error, or a worker that
 * stopped mid-run) is retried twice, after a randomised 15–30 s and then 30–60 s. A worker that
 * dies without a word is noticed by its missing heartbeats (lib/reports/lost-runs.ts), and its job
 * handed back within a minute or so; the expiry is only the backstop. It must outlast the longest
 * healthy run: a dataset larger than memory (10M rows, 5.5 GB of CSV) takes about half an hour on
 * two busy cores, and an expired job would be started again beside the run still going.
 */
export const ANALYSIS_JOB_POLICY = {
  retryLimit: 2,
  retryDelay: 15,
  retryBackoff: true,
  expireInSeconds: 6 * 60 * 60,
} as const;

/** What a job carries: the analysis to run, and its workspace (every query is scoped by it). */
export const analysisJobSchema = z.object({
  analysisId: z.string().min(1),
  workspaceId: z.string().min(1),
});

export type AnalysisJob = z.infer<typeof analysisJobSchema>;
