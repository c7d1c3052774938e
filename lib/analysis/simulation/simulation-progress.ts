import type { AlgorithmName } from "./run-algorithm";

/**
 * Where a simulation is, reported while it runs. A module of its own because both the scheduler
 * (schedule-runs.ts) and the plan (simulate-plan.ts) speak it.
 */
export interface SimulationProgress {
  algorithm: AlgorithmName;
  /** Searching the step size on one seed, or re-running the chosen one on S seeds. */
  phase: "step-size" | "seeds";
  /**
   * 1-based run number among `runs` = 3 × (8 + 3 + S): per algorithm the grid, three places for
   * extending it (skipped unless needed) and the seeds.
   */
  run: number;
  runs: number;
  /** Rounds finished in this run. */
  round: number;
  rounds: number;
  /** The whole simulation's progress, 0 to 1. */
  fraction: number;
}
