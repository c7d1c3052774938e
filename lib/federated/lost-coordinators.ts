import "server-only";
import type PgBoss from "pg-boss";
import { handBackLostCoordinators } from "@/db/queries/federated-analyses";
import { FEDERATED_JOB_POLICY, FEDERATED_QUEUE } from "@/lib/jobs";

/**
 * Finds federated analyses whose coordinator stopped sending heartbeats for `staleAfterMs` (its
 * worker died) and hands their job back: failed at once instead of waiting hours for its expiry,
 * so pg-boss retries it (after its retry delay) on whichever worker is alive, and the new
 * coordinator replays the fit from the stored answers. A job that cannot be retried any more is
 * replaced by a new one. The analysis's clients notice nothing but the pause.
 */
export async function sweepLostCoordinators(
  boss: PgBoss,
  settings: { staleAfterMs: number; log(line: string): void },
): Promise<void> {
  const lost = await handBackLostCoordinators(settings.staleAfterMs);
  for (const { federatedAnalysisId, jobId } of lost) {
    if (jobId) {
      await boss.fail(FEDERATED_QUEUE, jobId, { message: "worker stopped sending heartbeats" });
    }
    const job = jobId ? await boss.getJobById(FEDERATED_QUEUE, jobId) : null;
    if (job?.state !== "retry") {
      await boss.send(
        FEDERATED_QUEUE,
        { federatedAnalysisId },
        { ...FEDERATED_JOB_POLICY, singletonKey: federatedAnalysisId },
      );
    }
    settings.log(
      `federated analysis ${federatedAnalysisId}: its coordinator's worker stopped; handed back to the queue`,
    );
  }
}
