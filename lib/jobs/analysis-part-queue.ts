import { z } from "zod";

/**
 * The pg-boss queue of analysis parts (one analysis shared by several workers), apart from the
 * analyses' own queue: the analysis's job coordinates its parts and waits for them, holding its
 * worker's analysis slot, so parts on that same one-at-a-time queue could wait for a slot forever.
 */
export const ANALYSIS_PART_QUEUE = "analysis-part";

/**
 * Retries and expiry of a part's job. A part lives as long as the coordinator's fit asks it
 * questions (minutes to hours); a worker that stops is noticed by its heartbeat
 * (lib/reports/lost-runs.ts) well before the expiry, and its part goes to another worker after a
 * second. Retried often: each worker lost along the way costs one.
 */
export const ANALYSIS_PART_JOB_POLICY = {
  retryLimit: 5,
  retryDelay: 1,
  retryBackoff: false,
  expireInSeconds: 6 * 60 * 60,
} as const;

/** What a part's job carries: the analysis, its workspace, the coordinator's run and the part. */
export const analysisPartJobSchema = z.object({
  analysisId: z.string().min(1),
  workspaceId: z.string().min(1),
  runId: z.string().min(1),
  partIndex: z.number().int().min(0),
});

export type AnalysisPartJob = z.infer<typeof analysisPartJobSchema>;
