import { z } from "zod";

/** The pg-boss queue of federated coordinators (methods.md §9), apart from file analyses. */
export const FEDERATED_QUEUE = "federated-analysis";

/**
 * Retries and expiry of a coordinator job. The coordinator waits on its clients (the fit asks each
 * one evaluation after another), so a healthy run can last hours. A crashed worker's job is handed
 * back by the heartbeat sweep (lib/federated/lost-coordinators.ts) long before this expiry, its
 * backstop, and the new coordinator replays the fit from the stored answers.
 */
export const FEDERATED_JOB_POLICY = {
  retryLimit: 2,
  retryDelay: 15,
  retryBackoff: true,
  expireInSeconds: 6 * 60 * 60,
} as const;

export const federatedJobSchema = z.object({ federatedAnalysisId: z.string().min(1) });

export type FederatedJob = z.infer<typeof federatedJobSchema>;
