import { z } from "zod";

/** The pg-boss queue every analysis job goes through; all workers sharing a database share it. */
export const ANALYSIS_QUEUE = "analysis";

/**
 * Retries and expiry of an analysis job. A job that throws (an internal error, or a worker that
 * stopped mid-run) is retried twice, after a randomised 15–30 s and then 30–60 s. A worker that dies without a word
 * holds its job until it expires; 15 minutes is about eight times what the 1-million-row benchmark
 * (64 features, 10 classes, 100 shards) takes on two busy cores, so a healthy slow run is never cut
 * short, and a crashed worker's job is picked up again by any worker after at most that long.
 */
export const ANALYSIS_JOB_POLICY = {
  retryLimit: 2,
  retryDelay: 15,
  retryBackoff: true,
  expireInSeconds: 15 * 60,
} as const;

/** What a job carries: the analysis to run, and its workspace (every query is scoped by it). */
export const analysisJobSchema = z.object({
  analysisId: z.string().min(1),
  workspaceId: z.string().min(1),
});

export type AnalysisJob = z.infer<typeof analysisJobSchema>;
