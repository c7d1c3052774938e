import type { SimulationProgress } from "@/lib/analysis/browser";
import { describeSimulationPhase, describeSimulationProgress } from "@/lib/reports/simulation-view";
import { ProgressBar } from "./progress-bar";

/** Where the simulation is: algorithm, run and round, what the run is for, and its own bar. */
export function SimulationProgressLine({ progress }: { progress: SimulationProgress }) {
  return (
    <div className="space-y-1.5 rounded-md border border-ink/10 bg-paper/60 px-4 py-3">
      <p className="text-sm font-medium tabular-nums">{describeSimulationProgress(progress)}</p>
      <p className="text-xs text-ink-soft">
        This run is {describeSimulationPhase(progress.phase)}. Each algorithm tries 8 step sizes,
        then re-runs the best one on fresh seeds.
      </p>
      <ProgressBar value={progress.fraction} label="Progress of the simulation" />
    </div>
  );
}
