import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Design } from "@/lib/analysis/design";
import {
  runAlgorithm,
  type RunOutcome,
  type SimulationProblem,
  type TrainingPlan,
} from "@/lib/analysis/simulation/run-algorithm";
import type { RunRequest } from "@/lib/analysis/simulation/run-thread-protocol";
import { RunThreads, type RunExecutor } from "@/lib/analysis/simulation/run-threads";
import { RunSchedule, type PlannedRun } from "@/lib/analysis/simulation/schedule-runs";
import {
  chooseCurveRounds,
  simulatePlan,
  type SimulationProgress,
} from "@/lib/analysis/simulation/simulate-plan";
import { designOf, penguinsWithShards } from "./support/simulation-data";

// Open data: the vega-datasets penguins, one shard per island. The checks are identities of the
// design (methods.md §7, determinism): which thread does a run must not change a single bit.
const LAMBDA = 1e-3;
const PLAN: TrainingPlan = { participants: 2, localSteps: 4, rounds: 40, batchSize: 8 };

let classification: Design;
let regression: Design;

beforeAll(async () => {
  const csv = penguinsWithShards((_, record) => record.Island);
  classification = await designOf(csv, "Species");
  regression = await designOf(csv, "Body Mass (g)", "regression");
});

function problemOf(design: Design): SimulationProblem {
  // F(0): log C for softmax; for least squares ½·mean(y²) = ½ on standardized targets.
  const startValue = design.classes === null ? 0.5 : Math.log(design.classes.length);
  return { design, lambda: LAMBDA, optimumValue: 0, startValue };
}

/** Resolves once `count` worker threads have loaded; fails the test on a thread failure. */
function startThreads(count: number, problem: SimulationProblem) {
  const ready: RunExecutor[] = [];
  let failure: Error | null = null;
  const threads = new RunThreads(count, problem, PLAN, {
    onReady: (executor) => ready.push(executor),
    onFailure: (error) => (failure = error),
  });
  const loaded = new Promise<RunExecutor[]>((resolve, reject) => {
    const check = () => {
      if (failure !== null) reject(failure);
      else if (ready.length === count) resolve(ready);
      else setTimeout(check, 20);
    };
    check();
  });
  return { threads, loaded };
}

/** A run's outcome as plain data (NaN stays NaN under toEqual). */
function plain(outcome: RunOutcome | null) {
  return (
    outcome && { diverged: outcome.diverged, suboptimality: Array.from(outcome.suboptimality) }
  );
}

describe("simulation runs on worker threads", () => {
  const started: RunThreads[] = [];
  afterAll(() => Promise.all(started.map((threads) => threads.close())));

  it("a worker thread's run equals the calling thread's bit for bit, round reports included", async () => {
    for (const design of [classification, regression]) {
      const problem = problemOf(design);
      const { threads, loaded } = startThreads(2, problem);
      started.push(threads);
      const executors = await loaded;
      const curveRounds = chooseCurveRounds(PLAN.rounds);
      const requests: RunRequest[] = [
        { algorithm: "minibatch", stepSize: 0.05, seed: 3, curveRounds },
        { algorithm: "local", stepSize: 0.05, seed: 4, curveRounds },
        { algorithm: "scaffold", stepSize: 0.05, seed: 5, curveRounds },
        // Large enough to diverge, so the NaN tail of a stopped run crosses threads too.
        { algorithm: "local", stepSize: 64, seed: 6, curveRounds },
      ];
      const diverged: boolean[] = [];
      for (let i = 0; i < requests.length; i += 2) {
        const pair = requests.slice(i, i + 2);
        const reported: number[][] = pair.map(() => []);
        const onThreads = await Promise.all(
          pair.map((request, j) =>
            executors[j].execute(request, (round) => reported[j].push(round)),
          ),
        );
        for (const [j, request] of pair.entries()) {
          const local = await runAlgorithm(
            request.algorithm,
            problem,
            PLAN,
            request.stepSize,
            request.seed,
            request.curveRounds,
          );
          expect(plain(onThreads[j])).toEqual(plain(local));
          const lastRound = local.diverged
            ? request.curveRounds[local.suboptimality.findIndex(Number.isNaN) - 1] + 1
            : PLAN.rounds;
          expect(reported[j]).toEqual(Array.from({ length: lastRound }, (_, r) => r + 1));
        }
        diverged.push(...onThreads.map((outcome) => outcome.diverged));
      }
      expect(diverged.at(-1)).toBe(true);
      expect(diverged[0]).toBe(false);
    }
  });

  it("gives the same summary bit for bit on 1, 2 and 3 threads", async () => {
    for (const design of [classification, regression]) {
      const summaries = [];
      for (const threads of [1, 2, 3]) {
        // 1/H = 32: the grid's largest steps diverge, the smallest do not.
        const summary = await simulatePlan(
          { ...problemOf(design), smoothness: 1 / 32, boundVerdict: "no-clear-winner" },
          PLAN,
          { seeds: 2, seed: 9, budget: 1e12, threads },
        );
        summaries.push(JSON.stringify(summary));
      }
      expect(summaries[1]).toBe(summaries[0]);
      expect(summaries[2]).toBe(summaries[0]);
      // Discarded runs are part of what must match, and so are kept ones.
      const grids = JSON.parse(summaries[0]).algorithms.flatMap(
        (algorithm: { grid: { final: number | null }[] }) => algorithm.grid,
      );
      expect(grids.some((entry: { final: number | null }) => entry.final === null)).toBe(true);
      expect(grids.some((entry: { final: number | null }) => entry.final !== null)).toBe(true);
    }
  });
});

describe("the run schedule", () => {
  const problem = () => problemOf(classification);
  const curveRounds = () => chooseCurveRounds(PLAN.rounds);
  /** Three independent runs, then two that take the best of them (like a grid and its seeds). */
  function planRuns(dropDependents = false): PlannedRun[] {
    const grid = [0.5, 0.25, 0.125].map((stepSize): PlannedRun => ({
      algorithm: "local",
      phase: "step-size",
      seed: 1,
      curveRounds: curveRounds(),
      after: [],
      chooseStepSize: () => stepSize,
    }));
    const seeds = [2, 3].map((seed): PlannedRun => ({
      algorithm: "local",
      phase: "seeds",
      seed,
      curveRounds: curveRounds(),
      after: [0, 1, 2],
      chooseStepSize: (outcomes) => {
        if (dropDependents) return null;
        const finals = [0, 1, 2].map((k) => (outcomes[k] as RunOutcome).suboptimality.at(-1));
        return [0.5, 0.25, 0.125][finals.indexOf(Math.min(...(finals as number[])))];
      },
    }));
    return [...grid, ...seeds];
  }
  const runLocally = (request: RunRequest, onRound: (round: number) => void, signal: AbortSignal) =>
    runAlgorithm(
      request.algorithm,
      problem(),
      PLAN,
      request.stepSize,
      request.seed,
      request.curveRounds,
      { onRound, signal },
    );

  it("with a worker thread, returns the sequential outcomes and reports progress that never goes back", async () => {
    const sequential = await new RunSchedule(planRuns(), PLAN.rounds, runLocally, {}).perform();
    const { threads, loaded } = startThreads(1, problem());
    try {
      const [worker] = await loaded;
      let workerRuns = 0;
      const seen: SimulationProgress[] = [];
      const schedule = new RunSchedule(planRuns(), PLAN.rounds, runLocally, {
        onProgress: (progress) => seen.push(progress),
      });
      schedule.addExecutor({
        execute: (request, onRound) => {
          workerRuns++;
          return worker.execute(request, onRound);
        },
      });
      const shared = await schedule.perform();
      expect(shared.map(plain)).toEqual(sequential.map(plain));
      // Not a matter of timing: the worker was added before `perform`, so it is idle first and
      // takes run 1, and the calling thread takes run 2 in the same dispatch; the worker thus does
      // 1 to 4 of the 5 runs.
      expect(workerRuns).toBeGreaterThan(0);
      expect(workerRuns).toBeLessThan(5);
      const fractions = seen.map((progress) => progress.fraction);
      expect(fractions).toEqual([...fractions].sort((a, b) => a - b));
      expect(fractions.at(-1)).toBe(1);
      // Reports name the first run still going; here the waiting runs come last, so that never
      // goes back.
      const runs = seen.map((progress) => progress.run);
      expect(runs).toEqual([...runs].sort((a, b) => a - b));
      expect(new Set(runs).size).toBeGreaterThan(1);
      expect(seen.every((progress) => progress.runs === 5 && progress.rounds === 40)).toBe(true);
    } finally {
      await threads.close();
    }
  });

  it("drops runs whose step size is null, counting them as done", async () => {
    const seen: SimulationProgress[] = [];
    const outcomes = await new RunSchedule(planRuns(true), PLAN.rounds, runLocally, {
      onProgress: (progress) => seen.push(progress),
    }).perform();
    expect(outcomes.slice(3)).toEqual([null, null]);
    expect(outcomes.slice(0, 3).every((outcome) => outcome !== null)).toBe(true);
    expect(Math.max(...seen.map((progress) => progress.run))).toBe(3);
    // Three of five runs reported their rounds; the dropped two count as done at once.
    expect(seen.at(-1)?.fraction).toBe(3 / 5);
  });

  it("stops on abort with the signal's reason, also with a worker thread, and reports nothing after", async () => {
    const { threads, loaded } = startThreads(1, problem());
    try {
      const [worker] = await loaded;
      const controller = new AbortController();
      const seen: SimulationProgress[] = [];
      let afterAbort = 0;
      const schedule = new RunSchedule(planRuns(), PLAN.rounds, runLocally, {
        signal: controller.signal,
        onProgress: (progress) => {
          if (controller.signal.aborted) afterAbort++;
          seen.push(progress);
          if (progress.fraction >= 0.3) controller.abort(new Error("stopped by the test"));
        },
      });
      // The worker thread's runs go on after the abort (ending the thread is the caller's part),
      // still posting rounds; wait until each has ended — its rounds arrive before its result —
      // instead of sleeping, then check that none reached the listener.
      const workerRuns: Promise<unknown>[] = [];
      schedule.addExecutor({
        execute: (request, onRound) => {
          const run = worker.execute(request, onRound);
          workerRuns.push(run.catch(() => undefined));
          return run;
        },
      });
      await expect(schedule.perform()).rejects.toThrow("stopped by the test");
      await Promise.all(workerRuns);
      expect(workerRuns.length).toBeGreaterThan(0);
      expect(afterAbort).toBe(0);
      expect(seen.at(-1)?.fraction).toBeGreaterThanOrEqual(0.3);
      expect(seen.at(-1)?.fraction).toBeLessThan(1);
    } finally {
      await threads.close();
    }
  });
});
