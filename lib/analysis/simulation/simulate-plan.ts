import { mean } from "simple-statistics";

import { decideVerdict, type Verdict } from "../advise-plan";
import { countWeightRows } from "../objective";
import { countAvailableThreads } from "../pass-pool";
import {
  runAlgorithm,
  type AlgorithmName,
  type RunOutcome,
  type SimulationProblem,
  type TrainingPlan,
} from "./run-algorithm";
import { RunThreads } from "./run-threads";
import { RunSchedule, type PlannedRun } from "./schedule-runs";
import {
  ALGORITHMS,
  checkSimulationBudget,
  estimateSimulationCost,
  EXTENSION_STEP_COUNT,
  GRID_CHECK_POINTS,
  MAX_CURVE_POINTS,
  STEP_SIZE_COUNT,
} from "./simulation-cost";
import type { SimulationProgress } from "./simulation-progress";

export type { SimulationProgress } from "./simulation-progress";

// The cost and its check live in simulation-cost.ts, which imports no threads, so the web app can
// estimate a simulation without bundling its run threads.
export {
  ALGORITHMS,
  checkSimulationBudget,
  estimateSimulationCost,
  GRID_CHECK_POINTS,
  MAX_CURVE_POINTS,
  STEP_SIZE_COUNT,
};

/** The generator every run draws from, named in the summary (methods.md §7, determinism). */
export const GENERATOR_NAME = "xoshiro128**";
/**
 * From this estimated cost on, runs are shared with worker threads by default. A thread takes about
 * a second to load; on the benchmark one estimated multiply-add took about 5 ns on one thread, so
 * this is some 2.5 s of work.
 */
const PARALLEL_MIN_COST = 5e8;

export interface SimulationOptions {
  /** S, the seeds the chosen step size is re-run on. */
  seeds: number;
  /** The grid's seed; the re-runs use seed + 1 … seed + S. */
  seed: number;
  /** Refuse above this many multiply-adds (the estimate of `estimateSimulationCost`). */
  budget: number;
  /**
   * Threads doing runs at once, the calling thread included. Default: every core (at most 8) when
   * the estimated cost is at least 5e8 multiply-adds, else 1. The result is the same bit for bit
   * whatever the number.
   */
  threads?: number;
}

export interface SimulationInput extends SimulationProblem {
  /** H of methods.md §3: the grid's largest step size is 1/H. */
  smoothness: number;
  /** The bound-based verdict of methods.md §5, compared with the simulation's. */
  boundVerdict: Verdict;
}

export interface SimulationHooks {
  onProgress?: (progress: SimulationProgress) => void;
  signal?: AbortSignal;
}

export interface AlgorithmResult {
  name: AlgorithmName;
  /** The chosen η; null when every step size of the grid diverged. */
  stepSize: number | null;
  /**
   * The chosen η is still at an end of the extended grid (2³/H or 2⁻¹⁰/H), so a better one may lie
   * beyond it and the comparison may be unfair to this algorithm (methods.md §7).
   */
  stepSizeAtEdge: boolean;
  /** Final suboptimality F(W_R) − F(W*) over the seeds that did not diverge: mean, min, max. */
  final: number | null;
  finalMin: number | null;
  finalMax: number | null;
  /** [round, mean suboptimality over the seeds], at most 100 points. */
  curve: [number, number][];
  /** [round, min, max] over the seeds at the curve's rounds: the seed band. */
  band: [number, number, number][];
  /**
   * Every step size tried, largest first, and its final suboptimality on the grid's seed (null:
   * discarded): the 8 of the grid and those the extension added.
   */
  grid: { stepSize: number; final: number | null }[];
  /** Re-runs of the chosen step size that diverged (left out of the figures above). */
  divergedSeeds: number;
}

export interface SimulationSummary {
  generator: string;
  seed: number;
  /** S. */
  seeds: number;
  /** Estimated multiply-adds (methods.md §7) and the budget it was checked against. */
  cost: number;
  budget: number;
  algorithms: AlgorithmResult[];
  /** ρ_sim = local / minibatch mean final suboptimality; null when it is undefined. */
  ratio: number | null;
  verdict: Verdict;
  agreesWithBounds: boolean;
  /** One plain sentence on how the simulation compares with the bounds. */
  note: string;
}

/**
 * Runs methods.md §7 on the engine's objective: for each algorithm the step-size grid on one seed
 * (diverged runs discarded, lowest final F wins), then the chosen η on S fresh seeds; the curves,
 * the final suboptimality, ρ_sim, its verdict with §5's thresholds and whether it agrees with the
 * bounds. Refuses (AnalysisInputError) above the budget. The runs are independent but for each
 * algorithm's seed runs waiting for its grid, so they are shared among threads (`options.threads`).
 * Deterministic: same input, plan and seed, same result, on any machine and any number of threads.
 */
export async function simulatePlan(
  input: SimulationInput,
  plan: TrainingPlan,
  options: SimulationOptions,
  hooks: SimulationHooks = {},
): Promise<SimulationSummary> {
  const { design } = input;
  const cost = estimateSimulationCost(plan, design.x.cols, countWeightRows(design), options.seeds);
  checkSimulationBudget(cost, options.budget, plan, options.seeds);
  const curveRounds = chooseCurveRounds(plan.rounds);
  const checkRounds = chooseCurveRounds(plan.rounds, GRID_CHECK_POINTS);
  const runs = planRuns(input.smoothness, options, checkRounds, curveRounds);
  const threads = Math.min(options.threads ?? chooseThreadCount(cost), runs.length);
  const outcomes = await performRuns(input, plan, runs, threads, hooks);

  const searchRuns = STEP_SIZE_COUNT + EXTENSION_STEP_COUNT;
  const runsPerAlgorithm = searchRuns + options.seeds;
  const algorithms = ALGORITHMS.map((algorithm, a) => {
    const first = a * runsPerAlgorithm;
    const trials = collectTrials(outcomes.slice(first, first + searchRuns));
    const winner = chooseTrial(trials);
    const grid = trials.map((trial) => ({
      stepSize: stepSizeAt(trial.k, input.smoothness),
      final: finalOfGridRun(trial.outcome),
    }));
    const seedOutcomes = outcomes.slice(first + searchRuns, first + runsPerAlgorithm);
    return summarizeAlgorithm(
      algorithm,
      winner === null ? null : stepSizeAt(winner.k, input.smoothness),
      winner !== null && isAtEdge(winner, trials),
      grid,
      seedOutcomes.filter((outcome) => outcome !== null),
      curveRounds,
    );
  });

  const [minibatch, local] = algorithms;
  const ratio =
    minibatch.final !== null && local.final !== null && minibatch.final > 0
      ? local.final / minibatch.final
      : null;
  const verdict = decideVerdict(ratio);
  const agreesWithBounds = verdict === input.boundVerdict;
  return {
    generator: GENERATOR_NAME,
    seed: options.seed,
    seeds: options.seeds,
    cost,
    budget: options.budget,
    algorithms,
    ratio,
    verdict,
    agreesWithBounds,
    note: describeAgreement(verdict, input.boundVerdict, ratio),
  };
}

/**
 * The runs in report order — per algorithm the step-size grid on the grid's seed, up to three runs
 * extending it one step at a time while its winner is at an end (each waits for the ones before it
 * and is dropped when not needed), then the chosen η on seeds seed + 1 … seed + S — numbered
 * 1 … 3(8 + 3 + S) in progress reports. A search run evaluates F at `checkRounds`, a seed run at
 * `curveRounds`.
 */
function planRuns(
  smoothness: number,
  options: SimulationOptions,
  checkRounds: Int32Array,
  curveRounds: Int32Array,
): PlannedRun[] {
  const runs: PlannedRun[] = [];
  for (const algorithm of ALGORITHMS) {
    const search: number[] = [];
    for (let k = 0; k < STEP_SIZE_COUNT; k++) {
      search.push(runs.length);
      runs.push({
        algorithm,
        phase: "step-size",
        seed: options.seed,
        curveRounds: checkRounds,
        after: [],
        chooseStepSize: () => stepSizeAt(k, smoothness),
      });
    }
    for (let e = 0; e < EXTENSION_STEP_COUNT; e++) {
      const before = [...search];
      search.push(runs.length);
      runs.push({
        algorithm,
        phase: "step-size",
        seed: options.seed,
        curveRounds: checkRounds,
        after: before,
        chooseStepSize: (outcomes) => {
          const k = chooseExtension(collectTrials(before.map((index) => outcomes[index])));
          return k === null ? null : stepSizeAt(k, smoothness);
        },
      });
    }
    const grid = [...search];
    for (let s = 1; s <= options.seeds; s++) {
      runs.push({
        algorithm,
        phase: "seeds",
        seed: options.seed + s,
        curveRounds,
        after: grid,
        chooseStepSize: (outcomes) => {
          const winner = chooseTrial(collectTrials(grid.map((index) => outcomes[index])));
          return winner === null ? null : stepSizeAt(winner.k, smoothness);
        },
      });
    }
  }
  return runs;
}

/**
 * Does the runs on `threads` threads (the calling thread and threads − 1 worker threads) and
 * returns their outcomes in plan order, null for the seed runs of an algorithm whose whole grid
 * diverged.
 */
async function performRuns(
  input: SimulationInput,
  plan: TrainingPlan,
  runs: PlannedRun[],
  threads: number,
  hooks: SimulationHooks,
): Promise<(RunOutcome | null)[]> {
  const schedule = new RunSchedule(
    runs,
    plan.rounds,
    (request, onRound, signal) =>
      runAlgorithm(
        request.algorithm,
        input,
        plan,
        request.stepSize,
        request.seed,
        request.curveRounds,
        { onRound, signal },
      ),
    hooks,
  );
  const workers =
    threads > 1
      ? new RunThreads(threads - 1, input, plan, {
          onReady: (executor) => schedule.addExecutor(executor),
          onFailure: (error) => schedule.fail(error),
        })
      : null;
  try {
    return await schedule.perform();
  } finally {
    await workers?.close();
  }
}

function chooseThreadCount(cost: number): number {
  return cost >= PARALLEL_MIN_COST ? countAvailableThreads() : 1;
}

/** η = 2⁻ᵏ/H, the grid's k-th step size (methods.md §7); the extension adds k = −1 … −3 or 8 … 10. */
function stepSizeAt(k: number, smoothness: number): number {
  return 2 ** -k / smoothness;
}

/** The extension's bounds on k: η from 2³/H down to 2⁻¹⁰/H (methods.md §7). */
const SMALLEST_K = -EXTENSION_STEP_COUNT;
const LARGEST_K = STEP_SIZE_COUNT - 1 + EXTENSION_STEP_COUNT;

/** A step size tried on the grid's seed: η = 2⁻ᵏ/H and its run. */
interface Trial {
  k: number;
  outcome: RunOutcome;
}

/**
 * The step sizes tried, by increasing k (largest η first), from the search runs' outcomes in plan
 * order: the grid's k = 0 … 7, then each extension run that was not dropped. An extension run's k
 * is not stored, but follows from the trials before it, so it is worked out again here.
 */
function collectTrials(searchOutcomes: readonly (RunOutcome | null)[]): Trial[] {
  const trials: Trial[] = [];
  searchOutcomes.forEach((outcome, index) => {
    if (outcome === null) return; // an extension run that was not needed
    const k = index < STEP_SIZE_COUNT ? index : chooseExtension(trials);
    if (k === null) throw new Error("an extension run ran without a step size to try");
    trials.push({ k, outcome });
    trials.sort((a, b) => a.k - b.k);
  });
  return trials;
}

/** The trial with the lowest final F (the largest η, on a tie), or null when every run diverged. */
function chooseTrial(trials: readonly Trial[]): Trial | null {
  let chosen: Trial | null = null;
  let best = Infinity;
  for (const trial of trials) {
    const final = finalOfGridRun(trial.outcome);
    if (final !== null && final < best) {
      best = final;
      chosen = trial;
    }
  }
  return chosen;
}

/** The winner is the largest or the smallest η tried: a better one may lie beyond. */
function isAtEdge(winner: Trial, trials: readonly Trial[]): boolean {
  return winner.k === trials[0].k || winner.k === trials[trials.length - 1].k;
}

/**
 * The next k to try beyond the grid (methods.md §7): while the winner is the largest η tried,
 * double it (to 2³/H at most); while it is the smallest, halve it (to 2⁻¹⁰/H at most). Null when
 * the winner lies inside, every run diverged or the bound is reached.
 *
 * Example: the grid's winner at k = 0 gives k = −1 (η = 2/H); if that wins too, k = −2.
 */
function chooseExtension(trials: readonly Trial[]): number | null {
  const winner = chooseTrial(trials);
  if (winner === null) return null;
  const first = trials[0].k;
  const last = trials[trials.length - 1].k;
  if (winner.k === first && first > SMALLEST_K) return first - 1;
  if (winner.k === last && last < LARGEST_K) return last + 1;
  return null;
}

/** A grid run's suboptimality at its last check, or null when it diverged (discarded). */
function finalOfGridRun(outcome: RunOutcome | null): number | null {
  if (outcome === null || outcome.diverged) return null;
  return outcome.suboptimality[outcome.suboptimality.length - 1];
}

/**
 * Every round up to R when R + 1 ≤ `points`, else `points` evenly spaced rounds from 0 to R.
 *
 * Example: R = 1000 and 100 points give 0, 10, 20, …, 990, 1000 (rounded multiples of 1000/99).
 */
export function chooseCurveRounds(rounds: number, points = MAX_CURVE_POINTS): Int32Array {
  if (rounds + 1 <= points) return Int32Array.from({ length: rounds + 1 }, (_, r) => r);
  // Steps of R/(points − 1) ≥ 1 round apart, so rounding keeps the rounds distinct.
  return Int32Array.from({ length: points }, (_, i) => Math.round((i * rounds) / (points - 1)));
}

function summarizeAlgorithm(
  name: AlgorithmName,
  stepSize: number | null,
  stepSizeAtEdge: boolean,
  grid: AlgorithmResult["grid"],
  outcomes: RunOutcome[],
  curveRounds: Int32Array,
): AlgorithmResult {
  const kept = outcomes.filter((outcome) => !outcome.diverged);
  const divergedSeeds = outcomes.length - kept.length;
  if (kept.length === 0) {
    return {
      name,
      stepSize,
      stepSizeAtEdge,
      final: null,
      finalMin: null,
      finalMax: null,
      curve: [],
      band: [],
      grid,
      divergedSeeds,
    };
  }
  const curve: [number, number][] = [];
  const band: [number, number, number][] = [];
  curveRounds.forEach((round, index) => {
    const values = kept.map((outcome) => outcome.suboptimality[index]);
    curve.push([round, mean(values)]);
    band.push([round, Math.min(...values), Math.max(...values)]);
  });
  const last = band[band.length - 1];
  return {
    name,
    stepSize,
    stepSizeAtEdge,
    final: curve[curve.length - 1][1],
    finalMin: last[1],
    finalMax: last[2],
    curve,
    band,
    grid,
    divergedSeeds,
  };
}

const VERDICT_WORDS: Record<Verdict, string> = {
  "local-updates": "local updates",
  "large-minibatch": "large minibatches",
  "no-clear-winner": "no clear winner",
};

function describeAgreement(simulated: Verdict, bound: Verdict, ratio: number | null): string {
  const measured =
    ratio === null
      ? "the simulation gives no usable ratio"
      : `on this split local SGD ended at ${ratio.toPrecision(3)} times minibatch SGD's suboptimality`;
  if (simulated === bound) {
    return `The simulation agrees with the bounds (${VERDICT_WORDS[bound]}): ${measured}.`;
  }
  return (
    `The simulation disagrees with the bounds: they point to ${VERDICT_WORDS[bound]}, ` +
    `but ${measured} (${VERDICT_WORDS[simulated]}).`
  );
}
