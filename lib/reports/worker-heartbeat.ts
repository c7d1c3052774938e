import { recordHeartbeat } from "@/db/queries/analyses";
import type { AnalysisJob } from "@/lib/jobs";

/**
 * Records every `intervalMs` that this worker still runs the job's analysis, so that when the
 * worker dies another one notices (lib/reports/lost-runs.ts). The engine runs in a thread, so the
 * worker's own event loop stays free for these writes however long a computation takes. Returns
 * the function that stops it.
 */
export function startHeartbeat(job: AnalysisJob, intervalMs: number): () => void {
  const timer = setInterval(() => {
    recordHeartbeat(job.workspaceId, job.analysisId).catch((error: unknown) => {
      // One missed beat is harmless; a run is counted lost only after several.
      console.error(
        `[analysis ${job.analysisId}] could not record a heartbeat:`,
        error instanceof Error ? error.message : error,
      );
    });
  }, intervalMs);
  return () => clearInterval(timer);
}
