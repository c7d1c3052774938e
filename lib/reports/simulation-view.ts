import type { AlgorithmName, AlgorithmResult, SimulationProgress, Verdict } from "@/lib/analysis/browser";
import { formatFigure, VERDICT_LABELS } from "./report-view";

// How the simulation of methods.md §7 reads in the product: names, progress lines, the report's
// curves and its comparison with the bounds.

export const ALGORITHM_LABELS: Record<AlgorithmName, string> = {
  minibatch: "Minibatch SGD",
  local: "Local SGD",
  scaffold: "Drift-corrected local updates (SCAFFOLD)",
};

/** "Simulating: Local SGD, run 14 of 33, round 40 of 100". */
export function describeSimulationProgress(progress: SimulationProgress): string {
  const { algorithm, run, runs, round, rounds } = progress;
  return `Simulating: ${ALGORITHM_LABELS[algorithm]}, run ${run} of ${runs}, round ${round} of ${rounds}`;
}

/** What the current run is for, in words. */
export function describeSimulationPhase(phase: SimulationProgress["phase"]): string {
  return phase === "step-size"
    ? "searching the step size on one seed"
    : "re-running the chosen step size on fresh seeds";
}

/**
 * The smallest suboptimality a log scale shows. F(W_r) − F(W*) is ≥ 0 in exact arithmetic, but a
 * run that reaches the optimum ends at rounding noise around it (values like −1e-16 occur), and a
 * logarithm of 0 or less does not exist; such values are drawn at this floor. 1e-12 is about
 * 10⁴ × machine epsilon relative to a loss of order 1: below it the difference is rounding.
 */
export const SUBOPTIMALITY_FLOOR = 1e-12;

export function clampSuboptimality(value: number): number {
  return Math.max(value, SUBOPTIMALITY_FLOOR);
}

export interface CurvePoint {
  round: number;
  mean: number;
  min: number;
  max: number;
}

/**
 * One algorithm's mean curve with its seed band (min–max over the seeds) as points a log scale can
 * draw, every value clamped to SUBOPTIMALITY_FLOOR; `clamped` says whether any value was.
 */
export function toCurvePoints(result: Pick<AlgorithmResult, "curve" | "band">): {
  points: CurvePoint[];
  clamped: boolean;
} {
  let clamped = false;
  const clamp = (value: number) => {
    if (value < SUBOPTIMALITY_FLOOR) clamped = true;
    return clampSuboptimality(value);
  };
  const points = result.curve.map(([round, mean], index) => {
    const [, min, max] = result.band[index] ?? [round, mean, mean];
    return { round, mean: clamp(mean), min: clamp(min), max: clamp(max) };
  });
  return { points, clamped };
}

/** True when one verdict favours local updates and the other large minibatches. */
function pointOpposite(a: Verdict, b: Verdict): boolean {
  return (
    (a === "local-updates" && b === "large-minibatch") ||
    (a === "large-minibatch" && b === "local-updates")
  );
}

/**
 * The plain sentence that sets the simulation beside the bounds. ρ_sim is local SGD's final
 * suboptimality over minibatch SGD's (methods.md §7), null when undefined.
 *
 * Example: bounds "large-minibatch", simulation "local-updates", ρ_sim = 0.2 → "The simulation on
 * your shards points the other way from the bounds: they favour large minibatches, but local SGD
 * ended at 0.2 times minibatch SGD's suboptimality, which favours local updates."
 */
export function describeComparison(
  simulated: Verdict,
  bound: Verdict,
  ratio: number | null,
): string {
  const bounds = VERDICT_LABELS[bound].toLowerCase();
  if (ratio === null) {
    return `The simulation on your shards gives no usable ratio of local to minibatch SGD's final suboptimality (one of them diverged at every step size, or minibatch SGD ended exactly at the optimum), so it neither backs nor contradicts the bounds (${bounds}).`;
  }
  const measured = `local SGD ended at ${formatFigure(ratio)} times minibatch SGD's suboptimality`;
  if (simulated === bound) {
    return `The simulation on your shards agrees with the bounds (${bounds}): ${measured}.`;
  }
  const outcome =
    simulated === "no-clear-winner"
      ? "within a factor of two, so no clear winner"
      : `which favours ${VERDICT_LABELS[simulated].toLowerCase()}`;
  if (pointOpposite(simulated, bound)) {
    return `The simulation on your shards points the other way from the bounds: they favour ${bounds}, but ${measured}, ${outcome}.`;
  }
  const boundsSide =
    bound === "no-clear-winner" ? "the bounds see no clear winner" : `the bounds favour ${bounds}`;
  return `The simulation on your shards does not back the bounds' verdict: ${boundsSide}, but ${measured}, ${outcome}.`;
}

/**
 * methods.md §7: when an algorithm's chosen step size is still at an end of the extended grid, the
 * report says that a better one may lie beyond and the comparison may be unfair to it: one
 * sentence per flagged algorithm. Summaries stored before the flag existed carry none, and read as
 * not flagged.
 *
 * Example: local SGD flagged at η = 8/H = 0.4 → "Local SGD's best step size, 0.4, is the largest
 * tried: a larger one might do better, so the comparison may be unfair to it."
 */
export function describeStepSizeEdges(
  algorithms: readonly Pick<AlgorithmResult, "name" | "stepSize" | "stepSizeAtEdge" | "grid">[],
): string[] {
  return algorithms.flatMap((result) => {
    if (!result.stepSizeAtEdge || result.stepSize === null || result.grid.length === 0) return [];
    const largest = result.stepSize === result.grid[0].stepSize;
    return [
      `${ALGORITHM_LABELS[result.name]}'s best step size, ${formatFigure(result.stepSize)}, is the ` +
        `${largest ? "largest" : "smallest"} tried: a ${largest ? "larger" : "smaller"} one might ` +
        "do better, so the comparison may be unfair to it.",
    ];
  });
}
