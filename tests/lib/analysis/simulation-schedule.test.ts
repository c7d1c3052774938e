import { describe, expect, it } from "vitest";
import type { RunOutcome } from "@/lib/analysis/simulation/run-algorithm";
import type { RunRequest } from "@/lib/analysis/simulation/run-thread-protocol";
import { RunSchedule, type PlannedRun } from "@/lib/analysis/simulation/schedule-runs";
import type { SimulationProgress } from "@/lib/analysis/simulation/simulation-progress";

// The run schedule's contract (schedule-runs.ts, methods.md §7's runs and progress): executors
// stand in for runs here, answering when the test says, so every order below is decided by the
// schedule, not by timing.

const ROUNDS = 4;

function outcome(final: number, diverged = false): RunOutcome {
  return { suboptimality: Float64Array.of(1, final), diverged };
}

/** A run whose η is fixed, or chosen from earlier outcomes. */
function planned(
  algorithm: PlannedRun["algorithm"],
  seed: number,
  after: number[] = [],
  chooseStepSize: PlannedRun["chooseStepSize"] = () => seed / 10,
): PlannedRun {
  return {
    algorithm,
    phase: after.length > 0 ? "seeds" : "step-size",
    seed,
    curveRounds: Int32Array.of(0, ROUNDS),
    after,
    chooseStepSize,
  };
}

/** An executor whose runs wait until the test finishes them (`finish`). */
function manualExecutor() {
  const started: { request: RunRequest; onRound: (round: number) => void; signal?: AbortSignal }[] =
    [];
  const pending: { resolve: (outcome: RunOutcome) => void; reject: (error: unknown) => void }[] =
    [];
  return {
    started,
    execute(request: RunRequest, onRound: (round: number) => void, signal?: AbortSignal) {
      started.push({ request, onRound, signal });
      return new Promise<RunOutcome>((resolve, reject) => pending.push({ resolve, reject }));
    },
    /** Reports `rounds` rounds of the k-th run started here, then ends it with `result`. */
    async finish(k: number, result: RunOutcome, rounds = ROUNDS) {
      for (let round = 1; round <= rounds; round++) started[k].onRound(round);
      pending[k].resolve(result);
      // Let the schedule take the outcome and dispatch.
      await new Promise((resolve) => setImmediate(resolve));
    },
    async fail(k: number, error: Error) {
      pending[k].reject(error);
      await new Promise((resolve) => setImmediate(resolve));
    },
  };
}

describe("the run schedule (schedule-runs.ts)", () => {
  it("on the calling thread alone: runs in list order, η from earlier outcomes, dropped runs null, progress over all runs", async () => {
    const local = manualExecutor();
    const seen: SimulationProgress[] = [];
    const chosenFrom: (RunOutcome | null)[][] = [];
    const runs = [
      planned("minibatch", 1),
      planned("minibatch", 2),
      planned("local", 3, [0, 1], (outcomes) => {
        chosenFrom.push([...outcomes]);
        return 0.25;
      }),
      planned("scaffold", 4, [2], () => null),
    ];
    const schedule = new RunSchedule(runs, ROUNDS, local.execute, {
      onProgress: (progress) => seen.push(progress),
    });
    const done = schedule.perform();
    expect(local.started.map((run) => run.request.seed)).toEqual([1]);
    expect(local.started[0].request).toEqual({
      algorithm: "minibatch",
      stepSize: 0.1,
      seed: 1,
      curveRounds: Int32Array.of(0, ROUNDS),
    });
    await local.finish(0, outcome(0.5));
    expect(local.started.map((run) => run.request.seed)).toEqual([1, 2]);
    await local.finish(1, outcome(0.75));
    expect(chosenFrom).toEqual([[outcome(0.5), outcome(0.75), null, null]]);
    expect(local.started[2].request).toMatchObject({ algorithm: "local", stepSize: 0.25, seed: 3 });
    await local.finish(2, outcome(0.125));
    await expect(done).resolves.toEqual([outcome(0.5), outcome(0.75), outcome(0.125), null]);
    expect(local.started).toHaveLength(3);
    // Progress: the rounds done over 4 runs × 4 rounds, the dropped run counted whole at the end.
    expect(seen[0]).toEqual({
      algorithm: "minibatch",
      phase: "step-size",
      run: 1,
      runs: 4,
      round: 0,
      rounds: ROUNDS,
      fraction: 0,
    });
    expect(seen.map((p) => p.fraction)).toEqual([
      0,
      1 / 16,
      2 / 16,
      3 / 16,
      4 / 16,
      4 / 16,
      5 / 16,
      6 / 16,
      7 / 16,
      8 / 16,
      8 / 16,
      9 / 16,
      10 / 16,
      11 / 16,
      12 / 16,
    ]);
    expect(seen.map((p) => p.run)).toEqual([1, 1, 1, 1, 1, 2, 2, 2, 2, 2, 3, 3, 3, 3, 3]);
    expect(seen.at(-1)).toMatchObject({ algorithm: "local", phase: "seeds", round: 4 });
  });

  it("gives an added executor the first ready run, the calling thread the next, and each idle one the first ready in list order", async () => {
    const local = manualExecutor();
    const worker = manualExecutor();
    const seen: SimulationProgress[] = [];
    const runs = [
      planned("minibatch", 1),
      planned("minibatch", 2),
      planned("local", 3, [0]),
      planned("local", 4),
    ];
    const schedule = new RunSchedule(runs, ROUNDS, local.execute, {
      onProgress: (progress) => seen.push(progress),
    });
    schedule.addExecutor(worker);
    // Before `perform`, the worker already takes the first run.
    expect(worker.started.map((run) => run.request.seed)).toEqual([1]);
    const done = schedule.perform();
    expect(local.started.map((run) => run.request.seed)).toEqual([2]);
    // Run 3 waits for run 1: the calling thread, idle first, takes run 4.
    await local.finish(0, outcome(0.5));
    expect(local.started.map((run) => run.request.seed)).toEqual([2, 4]);
    await worker.finish(0, outcome(0.25), 2);
    expect(worker.started.map((run) => run.request.seed)).toEqual([1, 3]);
    // Reports name the first run still going: run 1 while it went, then run 3 (run 4 is later).
    expect(seen.at(-1)?.run).toBe(3);
    await worker.finish(1, outcome(0.125));
    await local.finish(1, outcome(0.0625));
    await expect(done).resolves.toEqual([
      outcome(0.25),
      outcome(0.5),
      outcome(0.125),
      outcome(0.0625),
    ]);
    // Run 1 ended after 2 of 4 rounds without diverging: its two last rounds never count.
    expect(seen.at(-1)?.fraction).toBe(14 / 16);
  });

  it("counts a dropped run's rounds as done and starts the runs that wait for it, with or without a listener", async () => {
    for (const listening of [true, false]) {
      const local = manualExecutor();
      const seen: SimulationProgress[] = [];
      const runs = [
        planned("local", 1),
        planned("local", 2, [0], () => null),
        planned("local", 3, [1]),
      ];
      const done = new RunSchedule(runs, ROUNDS, local.execute, {
        onProgress: listening ? (progress) => seen.push(progress) : undefined,
      }).perform();
      await local.finish(0, outcome(0.5));
      // Run 2 is dropped at once; run 3, which waits for it, starts.
      expect(local.started.map((run) => run.request.seed)).toEqual([1, 3]);
      if (listening) expect(seen.at(-1)).toMatchObject({ run: 3, fraction: 8 / 12 });
      await local.finish(1, outcome(0.25));
      await expect(done).resolves.toEqual([outcome(0.5), null, outcome(0.25)]);
    }
  });

  it("counts a diverged run's missing rounds as done", async () => {
    const local = manualExecutor();
    const seen: SimulationProgress[] = [];
    const schedule = new RunSchedule(
      [planned("local", 1), planned("local", 2)],
      ROUNDS,
      local.execute,
      {
        onProgress: (progress) => seen.push(progress),
      },
    );
    const done = schedule.perform();
    await local.finish(0, outcome(Number.NaN, true), 1);
    expect(seen.at(-1)?.fraction).toBe(4 / 8);
    await local.finish(1, outcome(0.5));
    await done;
    expect(seen.at(-1)?.fraction).toBe(1);
  });

  it("rejects with the reason of an abort, before or during the runs, stops the calling thread's run and reports nothing after", async () => {
    const before = new AbortController();
    before.abort(new Error("cancelled early"));
    const idle = manualExecutor();
    await expect(
      new RunSchedule([planned("local", 1)], ROUNDS, idle.execute, {
        signal: before.signal,
      }).perform(),
    ).rejects.toThrow("cancelled early");
    expect(idle.started).toHaveLength(0);

    const local = manualExecutor();
    const controller = new AbortController();
    const seen: SimulationProgress[] = [];
    const done = new RunSchedule(
      [planned("local", 1), planned("local", 2)],
      ROUNDS,
      local.execute,
      {
        signal: controller.signal,
        onProgress: (progress) => seen.push(progress),
      },
    ).perform();
    local.started[0].onRound(1);
    const reported = seen.length;
    controller.abort(new Error("cancelled"));
    await expect(done).rejects.toThrow("cancelled");
    expect(local.started[0].signal?.aborted).toBe(true);
    expect(local.started[0].signal?.reason).toEqual(new Error("cancelled"));
    // A late round and a late outcome change nothing and start no run.
    local.started[0].onRound(2);
    await local.finish(0, outcome(0.5));
    expect(seen).toHaveLength(reported);
    expect(local.started).toHaveLength(1);
  });

  it("rejects with the first failed run's error and silences the others", async () => {
    const local = manualExecutor();
    const worker = manualExecutor();
    const seen: SimulationProgress[] = [];
    const schedule = new RunSchedule(
      [planned("local", 1), planned("local", 2), planned("local", 3)],
      ROUNDS,
      local.execute,
      { onProgress: (progress) => seen.push(progress) },
    );
    schedule.addExecutor(worker);
    const done = schedule.perform();
    await worker.fail(0, new Error("thread failed"));
    await expect(done).rejects.toThrow("thread failed");
    const reported = seen.length;
    await local.finish(0, outcome(0.5));
    expect(seen).toHaveLength(reported);
    expect(local.started).toHaveLength(1);
    // A second failure changes nothing.
    schedule.fail(new Error("later"));
    await expect(done).rejects.toThrow("thread failed");
  });
});
