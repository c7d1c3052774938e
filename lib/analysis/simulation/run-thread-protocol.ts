/**
 * Messages between the simulation's calling thread and its worker threads (see run-threads.ts).
 * A worker thread holds one problem and plan, given at its start, and does one run at a time.
 */
import type { AlgorithmName, SimulationProblem, TrainingPlan } from "./run-algorithm";

/** workerData of a run thread; the design's arrays live in SharedArrayBuffers, so nothing is copied. */
export interface RunThreadData {
  problem: SimulationProblem;
  plan: TrainingPlan;
}

/** One run to do: everything `runAlgorithm` takes besides the problem and plan. */
export interface RunRequest {
  algorithm: AlgorithmName;
  stepSize: number;
  seed: number;
  curveRounds: Int32Array;
}

/** What a run thread posts back. */
export type RunThreadReport =
  | { type: "ready" }
  | { type: "round"; round: number }
  | { type: "done"; suboptimality: Float64Array; diverged: boolean }
  | { type: "failed"; detail: string };
