import { isAnalysisRunning, recordProgress, type LiveProgress } from "@/db/queries/analyses";
import type { AnalysisProgress, SimulationProgress } from "@/lib/analysis";
import type { AnalysisJob } from "@/lib/jobs";

export interface ProgressWriter {
  /** Takes the engine's latest progress; it is stored soon, coalesced with what follows. */
  report(progress: AnalysisProgress): void;
  /** Takes the simulation's latest run and round, stored beside the engine's last stage. */
  reportSimulation(progress: SimulationProgress): void;
  /** Stops writing and waits for a write in flight. */
  stop(): Promise<void>;
}

/**
 * Stores a run's progress for the browser to poll, and watches for the run being stopped from
 * outside. The engine reports thousands of times on a large input; writes are coalesced to at most
 * one per `intervalMs` with only the latest value stored, and one at a time. Every write checks the
 * analysis is still running; so does a status read each `pollMs` while nothing was written (the
 * engine can be silent for many seconds inside one step). When it is not — cancelled, or finished
 * by another worker — `onStopped` is called once.
 */
export function createProgressWriter(
  job: AnalysisJob,
  settings: { intervalMs: number; pollMs: number; onStopped(): void },
): ProgressWriter {
  let latest: LiveProgress | undefined;
  let written: LiveProgress | undefined;
  let lastWriteAt = -Infinity;
  let pending: ReturnType<typeof setTimeout> | undefined;
  let inFlight: Promise<void> | undefined;
  let stopped = false;

  const write = () => {
    pending = undefined;
    if (stopped || inFlight) return;
    const value = latest;
    lastWriteAt = performance.now();
    const stillRunning =
      value !== undefined && value !== written
        ? recordProgress(job.workspaceId, job.analysisId, value)
        : isAnalysisRunning(job.workspaceId, job.analysisId);
    inFlight = stillRunning
      .then((running) => {
        written = value;
        if (!running && !stopped) {
          stopped = true;
          settings.onStopped();
        }
      })
      .catch((error: unknown) => {
        // A lost progress write is not worth failing the analysis for; the next one may succeed.
        console.error(
          `[analysis ${job.analysisId}] could not store progress:`,
          error instanceof Error ? error.message : error,
        );
      })
      .finally(() => {
        inFlight = undefined;
        if (latest !== written) schedule();
      });
  };

  const schedule = () => {
    if (stopped || pending || inFlight) return;
    pending = setTimeout(write, Math.max(0, lastWriteAt + settings.intervalMs - performance.now()));
  };

  const poll = setInterval(() => {
    if (performance.now() - lastWriteAt >= settings.pollMs) write();
  }, settings.pollMs);

  return {
    report(progress) {
      latest = { ...progress, simulation: latest?.simulation ?? null };
      schedule();
    },
    reportSimulation(simulation) {
      // The engine reports its last stage before the simulation starts.
      latest = { stage: latest?.stage ?? "advising", fraction: latest?.fraction ?? 1, simulation };
      schedule();
    },
    async stop() {
      stopped = true;
      clearInterval(poll);
      clearTimeout(pending);
      await inFlight;
    },
  };
}
