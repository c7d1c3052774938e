import type { AlgorithmName, RunOutcome } from "./run-algorithm";
import type { RunRequest } from "./run-thread-protocol";
import type { RunExecutor } from "./run-threads";
import type { SimulationProgress } from "./simulation-progress";

/** One run of the simulation, numbered by its place in the plan's run list. */
export interface PlannedRun {
  algorithm: AlgorithmName;
  phase: SimulationProgress["phase"];
  seed: number;
  /** Rounds at which F is evaluated on all rows. */
  curveRounds: Int32Array;
  /** Runs (by index) that must finish before this one can start. */
  after: readonly number[];
  /** η, from the outcomes of the runs in `after`; null drops the run. */
  chooseStepSize: (outcomes: readonly (RunOutcome | null)[]) => number | null;
}

export interface ScheduleHooks {
  onProgress?: (progress: SimulationProgress) => void;
  /** Once aborted, the schedule rejects with the signal's reason. */
  signal?: AbortSignal;
}

/**
 * Does every run of `runs` with the executors at hand — the calling thread from the start,
 * worker threads as they load (`addExecutor`) — starting, whenever an executor is idle, the
 * first run in list order whose `after` runs have finished. `perform` resolves with each run's
 * outcome in list order (null for a dropped run); since a run's outcome depends only on its own
 * request, they are the same whatever ran where and when. It rejects on the first failure or
 * abort; runs still going on worker threads are then the caller's to stop (by ending the threads).
 */
export class RunSchedule {
  private readonly outcomes: (RunOutcome | null)[];
  private readonly state: ("waiting" | "running" | "finished")[];
  private readonly idle: RunExecutor[] = [];
  private readonly progress: ProgressTracker;
  private readonly halt = new AbortController();
  private unfinished: number;
  private settled = false;
  private resolve: (outcomes: (RunOutcome | null)[]) => void = () => {};
  private reject: (reason: unknown) => void = () => {};
  private readonly finished: Promise<(RunOutcome | null)[]>;
  private readonly onAbort = () => this.fail(this.hooks.signal?.reason);

  /**
   * `runLocally` does a run on the calling thread; it must stop, by throwing, once its signal is
   * aborted.
   */
  constructor(
    private readonly runs: readonly PlannedRun[],
    rounds: number,
    private readonly runLocally: (
      request: RunRequest,
      onRound: (round: number) => void,
      signal: AbortSignal,
    ) => Promise<RunOutcome>,
    private readonly hooks: ScheduleHooks,
  ) {
    this.outcomes = runs.map(() => null);
    this.state = runs.map(() => "waiting");
    this.unfinished = runs.length;
    this.progress = new ProgressTracker(runs, rounds, hooks.onProgress);
    this.finished = new Promise((resolve, reject) => {
      this.resolve = resolve;
      this.reject = reject;
    });
    // Nobody may be waiting yet when a worker thread fails; `perform` reports it.
    this.finished.catch(() => {});
  }

  /** Starts the runs on the calling thread (and the executors added); resolves when all are done. */
  perform(): Promise<(RunOutcome | null)[]> {
    const signal = this.hooks.signal;
    if (signal?.aborted) {
      this.fail(signal.reason);
    } else {
      signal?.addEventListener("abort", this.onAbort, { once: true });
      this.idle.push({
        execute: (request, onRound) => this.runLocally(request, onRound, this.halt.signal),
      });
      this.dispatch();
    }
    return this.finished;
  }

  /** Adds an executor (a worker thread that has loaded). */
  addExecutor(executor: RunExecutor): void {
    // Worker threads go first, so they are busy before the calling thread starts its own run.
    this.idle.unshift(executor);
    this.dispatch();
  }

  /** Stops the schedule: `finished` rejects with `reason`, and no progress is reported after. */
  fail(reason: unknown): void {
    if (this.settled) return;
    this.settle();
    this.progress.silence();
    this.halt.abort(reason);
    this.reject(reason);
  }

  private settle(): void {
    this.settled = true;
    this.hooks.signal?.removeEventListener("abort", this.onAbort);
  }

  private dispatch(): void {
    while (!this.settled && this.idle.length > 0) {
      const next = this.takeReadyRun();
      if (next === null) break;
      this.start(this.idle.shift() as RunExecutor, next.index, next.stepSize);
    }
    if (!this.settled && this.unfinished === 0) {
      this.settle();
      this.resolve(this.outcomes);
    }
  }

  /** The first waiting run whose prerequisites have finished, dropping those whose η is null. */
  private takeReadyRun(): { index: number; stepSize: number } | null {
    for (let index = 0; index < this.runs.length; index++) {
      const run = this.runs[index];
      if (this.state[index] !== "waiting") continue;
      if (run.after.some((before) => this.state[before] !== "finished")) continue;
      const stepSize = run.chooseStepSize(this.outcomes);
      if (stepSize !== null) return { index, stepSize };
      this.state[index] = "finished";
      this.unfinished--;
      this.progress.drop(index);
    }
    return null;
  }

  private start(executor: RunExecutor, index: number, stepSize: number): void {
    const run = this.runs[index];
    this.state[index] = "running";
    this.progress.start(index);
    const request: RunRequest = {
      algorithm: run.algorithm,
      stepSize,
      seed: run.seed,
      curveRounds: run.curveRounds,
    };
    executor
      .execute(request, (round) => this.progress.advance(index, round))
      .then(
        (outcome) => {
          if (this.settled) return;
          if (outcome.diverged) this.progress.complete(index);
          this.progress.stop(index);
          this.outcomes[index] = outcome;
          this.state[index] = "finished";
          this.unfinished--;
          this.idle.push(executor);
          this.dispatch();
        },
        (error: unknown) => this.fail(error),
      );
  }
}

/**
 * Progress of a schedule. `fraction` is the rounds done over all runs (a dropped or diverged run
 * counts whole), so it never goes back. With runs going on at once, each report names the first
 * run still going in plan order (and its round), not whichever run moved, so a listener that
 * prints a line when `run` changes prints about one per run; `run` goes back only when a run that
 * had to wait (a seed run, for its grid) starts after a later one. With one thread the reports are
 * those of the runs in turn.
 */
class ProgressTracker {
  private readonly roundsDone: Int32Array;
  private readonly running: number[] = [];
  private doneRounds = 0;
  private silent = false;

  constructor(
    private readonly runs: readonly PlannedRun[],
    private readonly rounds: number,
    private readonly report?: (progress: SimulationProgress) => void,
  ) {
    this.roundsDone = new Int32Array(runs.length);
  }

  start(index: number): void {
    this.running.push(index);
    this.emit();
  }

  advance(index: number, round: number): void {
    if (round > this.roundsDone[index]) {
      this.doneRounds += round - this.roundsDone[index];
      this.roundsDone[index] = round;
    }
    this.emit();
  }

  /** A run that stopped early (diverged) counts as done. */
  complete(index: number): void {
    this.advance(index, this.rounds);
  }

  stop(index: number): void {
    this.running.splice(this.running.indexOf(index), 1);
  }

  drop(index: number): void {
    this.doneRounds += this.rounds - this.roundsDone[index];
    this.roundsDone[index] = this.rounds;
  }

  silence(): void {
    this.silent = true;
  }

  private emit(): void {
    if (this.silent || this.report === undefined || this.running.length === 0) return;
    const front = Math.min(...this.running);
    const run = this.runs[front];
    this.report({
      algorithm: run.algorithm,
      phase: run.phase,
      run: front + 1,
      runs: this.runs.length,
      round: this.roundsDone[front],
      rounds: this.rounds,
      fraction: this.doneRounds / (this.runs.length * this.rounds),
    });
  }
}
