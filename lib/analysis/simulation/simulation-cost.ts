import { AnalysisInputError } from "../errors";
import type { AlgorithmName, TrainingPlan } from "./run-algorithm";

// The simulation's cost before it starts (methods.md §7), apart from the simulation itself: it
// imports no threads, so the web app can estimate and refuse a simulation without bundling them.

/** The algorithms of methods.md §7, in report order. */
export const ALGORITHMS: readonly AlgorithmName[] = ["minibatch", "local", "scaffold"];
/** Step sizes tried: η = 2⁻ᵏ/H for k = 0 … 7 (methods.md §7). */
export const STEP_SIZE_COUNT = 8;
/**
 * Step sizes tried beyond an end of the grid while its winner sits there: doubling up to 2³/H,
 * halving down to 2⁻¹⁰/H (methods.md §7). Only one end can be extended, so each algorithm has
 * this many extra runs at most; the cost estimate keeps methods.md's 8 + S, which it calls "about".
 */
export const EXTENSION_STEP_COUNT = 3;
/** A curve has at most this many points (methods.md §7). */
export const MAX_CURVE_POINTS = 100;
/**
 * A step-size search run evaluates F on all rows at this many rounds only (its final F decides, and
 * the loss check against 10·F(W₀) runs there; the weights' finiteness is checked every round): on
 * large data a full pass costs more than a round, and the grid has 8 runs per algorithm.
 */
export const GRID_CHECK_POINTS = 11;

/**
 * The simulation's cost in multiply-adds, as methods.md §7 estimates it before starting:
 * 3 algorithms × (8 + S) runs × R·M·K·b·(d+1)·C (C = 1 for least squares).
 *
 * Example: M = 100, K = 10, R = 100, b = 32, d + 1 = 33, C = 10, S = 3 gives 3.4848e10.
 *
 * It counts the training steps only (one multiply-add per score, as the formula does; a step's
 * gradient doubles the real count). Left out: F on all N rows at each curve point, a loss-only pass
 * of N·(d+1)·C multiply-adds, done 3 × (8·min(R + 1, 11) + S·min(R + 1, 100)) times (grid runs check
 * at 11 rounds, seed runs at up to 100). That is small beside the steps when N is small next to
 * R·M·K·b, but not always: on the benchmark (N = 100 000, the example's plan) it is 3.84e10, more
 * than this estimate and about half the steps' real count; with N = 10⁶, M = 10, K = 1, b = 32 it
 * is nearly all of the work. The shown cost and the budget keep methods.md §7's formula;
 * `estimateEvaluationCost` counts the rest, for the time a simulation will take.
 */
export function estimateSimulationCost(
  plan: TrainingPlan,
  width: number,
  weightRows: number,
  seeds: number,
): number {
  const perRun =
    plan.rounds * plan.participants * plan.localSteps * plan.batchSize * width * weightRows;
  return ALGORITHMS.length * (STEP_SIZE_COUNT + seeds) * perRun;
}

/**
 * The full-data loss passes the simulation adds to `estimateSimulationCost`'s steps, in
 * multiply-adds: N·(d+1)·C per pass, at each of a grid run's check points and a seed run's curve
 * points (round 0 included), for the 3 algorithms.
 *
 * Example: R = 100, S = 3, N = 100 000, d + 1 = 33, C = 10 gives 3 × (8·11 + 3·100) × 3.3e7 = 3.8412e10.
 */
export function estimateEvaluationCost(
  rounds: number,
  rows: number,
  width: number,
  weightRows: number,
  seeds: number,
): number {
  const passes =
    STEP_SIZE_COUNT * Math.min(rounds + 1, GRID_CHECK_POINTS) +
    seeds * Math.min(rounds + 1, MAX_CURVE_POINTS);
  return ALGORITHMS.length * passes * rows * width * weightRows;
}

/** The largest R, M and S that would each alone bring a simulation within its budget. */
export interface BudgetFit {
  rounds: number | null;
  participants: number | null;
  seeds: number | null;
}

/**
 * What alone would bring a simulation within its budget: the largest R, the largest M and the
 * largest S that each fit with the rest of the plan unchanged (the cost is linear in R and M, and
 * in 8 + S); null where even 1 does not fit.
 *
 * Example: cost 1.04544e9 (penguins by island, R = 1000, M = 3, S = 3), budget 1e8: R ≤ 95, M
 * fits at no value ≥ 1 (3 × 0.0957 < 1), S fits at no value ≥ 1 (11 × 0.0957 − 8 < 1).
 */
export function fitWithinBudget(
  cost: number,
  budget: number,
  plan: TrainingPlan,
  seeds: number,
): BudgetFit {
  const scale = budget / cost;
  const atLeastOne = (value: number) => (value >= 1 ? value : null);
  return {
    rounds: atLeastOne(Math.floor(plan.rounds * scale)),
    participants: atLeastOne(Math.floor(plan.participants * scale)),
    seeds: atLeastOne(Math.floor((STEP_SIZE_COUNT + seeds) * scale - STEP_SIZE_COUNT)),
  };
}

/** "1 round", "95 rounds". */
export function countOf(count: number, noun: string): string {
  return `${count} ${count === 1 ? noun : `${noun}s`}`;
}

/**
 * Throws AnalysisInputError when the estimated cost is above the budget, naming the largest
 * rounds, participants and seeds that would each fit (fitWithinBudget), so the user knows what to
 * ask for instead.
 */
export function checkSimulationBudget(
  cost: number,
  budget: number,
  plan: TrainingPlan,
  seeds: number,
): void {
  if (cost <= budget) return;
  const fit = fitWithinBudget(cost, budget, plan, seeds);
  const suggestions = [
    fit.rounds !== null ? `at most ${countOf(fit.rounds, "round")}` : null,
    fit.participants !== null
      ? `at most ${countOf(fit.participants, "participant")} per round`
      : null,
    fit.seeds !== null ? `at most ${countOf(fit.seeds, "seed")}` : null,
  ].filter((text) => text !== null);
  throw new AnalysisInputError(
    `the simulation would take about ${formatCount(cost)} multiply-adds, above the budget of ${formatCount(budget)}`,
    {
      expected:
        (suggestions.length > 0
          ? suggestions.join(", or ")
          : "fewer rounds, participants, local steps or a smaller batch together") +
        ", or a larger budget",
    },
  );
}

function formatCount(value: number): string {
  return value.toExponential(2).replace("e+", "e");
}
