import { afterEach, beforeAll, describe, expect, it, vi } from "vitest";
import type { Design } from "@/lib/analysis/design";
import {
  runAlgorithm,
  type AlgorithmName,
  type SimulationProblem,
  type TrainingPlan,
} from "@/lib/analysis/simulation/run-algorithm";
import { SeededRandom } from "@/lib/math/random";
import { runPythonJson } from "./support/run-python";
import { exportDesign, penguinDesigns } from "./support/simulation-data";

/**
 * Outside reference: the three algorithms of methods.md §7 written out in NumPy/SciPy from the
 * text of §7 (and SCAFFOLD's Algorithm 1, option II, in §7's size-weighted form), replaying the
 * run's own draws of xoshiro128** in the order §7 fixes — each round the participants (a partial
 * Fisher–Yates shuffle of the shards, kept from round to round, then ascending; none drawn when
 * every shard takes part), then per participant its K batches of b rows drawn with replacement
 * (none when b is at least the shard). The replay checks every draw's bound and that no draw is
 * left over. F(W) − F* at the curve's rounds; a run stops, as diverged, once its weights are not
 * finite or F at a curve round is not finite or exceeds 10·F(W₀).
 */
const REFERENCE = `import json, sys
import numpy as np
from scipy.special import logsumexp, softmax
d = json.load(sys.stdin)
X = np.array(d["x"]).reshape(d["rows"], d["cols"]); N = d["rows"]; lam = d["lam"]
offsets = d["offsets"]; S = len(offsets) - 1; sizes = np.diff(offsets)
C = d["classes"]; shape = (C, d["cols"]); mask = np.ones(shape); mask[:, -1] = 0
labels = None if d["labels"] is None else np.array(d["labels"])
targets = None if d["targets"] is None else np.array(d["targets"])
draws = []; position = 0
def draw(bound):
    global position
    recorded, value = draws[position]; position += 1
    assert recorded == bound, f"draw {position}: bound {recorded}, expected {bound}"
    return value
def parts(W, rows):
    Xs = X[rows]
    if labels is not None:
        y = labels[rows]; Z = Xs @ W.T
        return logsumexp(Z, axis=1) - Z[np.arange(len(rows)), y], softmax(Z, axis=1) - np.eye(C)[y], Xs
    r = Xs @ W[0] - targets[rows]
    return 0.5 * r ** 2, r[:, None], Xs
def grad(W, rows):
    _, R, Xs = parts(W, rows); return R.T @ Xs / len(rows) + lam * W * mask
def F(W):
    loss, _, _ = parts(W, np.arange(N)); return float(loss.mean() + lam / 2 * np.sum((W * mask) ** 2))
def batch(m):
    start, end = offsets[m], offsets[m + 1]; n = end - start
    if d["b"] >= n: return list(range(start, end))
    return [start + draw(n) for _ in range(d["b"])]
out = {}
for run in d["runs"]:
    algorithm, eta, M, K = run["algorithm"], run["eta"], run["M"], run["K"]
    draws = run["draws"]; position = 0
    W = np.zeros(shape); c = np.zeros(shape); cm = np.zeros((S,) + shape); order = list(range(S))
    limit = 10 * d["start"]; curve_rounds = run["curve"]; curve = []; diverged = False
    def record(W):
        f = F(W)
        if not np.isfinite(f) or f > limit: return False
        curve.append(f - d["optimum"]); return True
    if not record(W): diverged = True
    for r in range(1, d["R"] + 1):
        if diverged: break
        if M == S: chosen = list(range(S))
        else:
            for i in range(M):
                j = i + draw(S - i); order[i], order[j] = order[j], order[i]
            chosen = sorted(order[:M])
        share = sizes[chosen] / sizes[chosen].sum()
        if algorithm == "minibatch":
            step = np.zeros(shape)
            for p, m in zip(share, chosen):
                rows = [row for _ in range(K) for row in batch(m)]
                step += p * grad(W, rows)
            W = W - eta * step
        else:
            new = np.zeros(shape); change = np.zeros(shape)
            for p, m in zip(share, chosen):
                y = W.copy()
                for _ in range(K):
                    g = grad(y, batch(m))
                    y = y - eta * (g - cm[m] + c) if algorithm == "scaffold" else y - eta * g
                if algorithm == "scaffold":
                    after = cm[m] - c + (W - y) / (K * eta)
                    change += sizes[m] / N * (after - cm[m]); cm[m] = after
                new += p * y
            W = new; c = c + change
        if not np.all(np.isfinite(W)) or (r in curve_rounds and not record(W)): diverged = True
    assert diverged or position == len(draws), "draws left over"
    out[run["key"]] = {"curve": curve + [None] * (len(curve_rounds) - len(curve)), "diverged": diverged}
print(json.dumps(out))`;

const LAMBDA = 0.01;
const OPTIMUM = 0.125;

let classification: Design;
let regression: Design;

beforeAll(async () => {
  ({ classification, regression } = await penguinDesigns());
});

afterEach(() => {
  vi.restoreAllMocks();
});

interface RunSpec {
  algorithm: AlgorithmName;
  stepSize: number;
  participants: number;
  localSteps: number;
  curveRounds: number[];
  seed: number;
}

/** Runs each spec, recording its draws, and compares its curve with the NumPy replay's. */
async function checkRuns(
  design: Design,
  common: { rounds: number; batchSize: number; startValue: number },
  specs: RunSpec[],
) {
  const problem: SimulationProblem = {
    design,
    lambda: LAMBDA,
    optimumValue: OPTIMUM,
    startValue: common.startValue,
  };
  const integer = vi.spyOn(SeededRandom.prototype, "integer");
  const runs = [];
  const outcomes = [];
  for (const [key, spec] of specs.entries()) {
    integer.mockClear();
    const plan: TrainingPlan = {
      participants: spec.participants,
      localSteps: spec.localSteps,
      rounds: common.rounds,
      batchSize: common.batchSize,
    };
    const outcome = await runAlgorithm(
      spec.algorithm,
      problem,
      plan,
      spec.stepSize,
      spec.seed,
      Int32Array.from(spec.curveRounds),
    );
    outcomes.push(outcome);
    runs.push({
      key,
      algorithm: spec.algorithm,
      eta: spec.stepSize,
      M: spec.participants,
      K: spec.localSteps,
      curve: spec.curveRounds,
      draws: integer.mock.calls.map((call, k) => [call[0], integer.mock.results[k].value]),
    });
  }
  const expected = runPythonJson<Record<string, { curve: (number | null)[]; diverged: boolean }>>(
    REFERENCE,
    {
      ...exportDesign(design),
      offsets: Array.from(design.shardOffsets),
      lam: LAMBDA,
      optimum: OPTIMUM,
      start: common.startValue,
      R: common.rounds,
      b: common.batchSize,
      runs,
    },
  );
  outcomes.forEach((outcome, key) => {
    const reference = expected[key];
    const what = `${specs[key].algorithm} η=${specs[key].stepSize}`;
    expect(outcome.diverged, what).toBe(reference.diverged);
    expect(outcome.suboptimality).toHaveLength(reference.curve.length);
    reference.curve.forEach((value, k) => {
      if (value === null) expect(outcome.suboptimality[k], `${what} point ${k}`).toBeNaN();
      else
        expect(
          Math.abs(outcome.suboptimality[k] - value),
          `${what} point ${k}`,
        ).toBeLessThanOrEqual(1e-11 * Math.max(1, Math.abs(value)));
    });
  });
  return { outcomes, runs };
}

const EVERY_ROUND = Array.from({ length: 9 }, (_, r) => r);

describe("one run of an algorithm of methods.md §7, replayed in NumPy", () => {
  it("softmax, 2 of 3 shards per round, K = 3, b = 5: minibatch, local and SCAFFOLD", async () => {
    const specs: RunSpec[] = (["minibatch", "local", "scaffold"] as const).map((algorithm) => ({
      algorithm,
      stepSize: 0.6,
      participants: 2,
      localSteps: 3,
      curveRounds: EVERY_ROUND,
      seed: 4,
    }));
    const { runs } = await checkRuns(
      classification,
      { rounds: 8, batchSize: 5, startValue: Math.log(3) },
      specs,
    );
    // Common random numbers: the three algorithms drew the same rows.
    expect(runs[1].draws).toEqual(runs[0].draws);
    expect(runs[2].draws).toEqual(runs[0].draws);
  });

  it("least squares, every shard each round, b = 60 (the 52-row shard is taken whole), sparse curve rounds", async () => {
    const specs: RunSpec[] = (["minibatch", "local", "scaffold"] as const).map((algorithm, k) => ({
      algorithm,
      stepSize: 0.15,
      participants: 3,
      localSteps: 2,
      curveRounds: [0, 3, 5, 8],
      seed: 9 + k,
    }));
    await checkRuns(regression, { rounds: 8, batchSize: 60, startValue: 0.5 }, specs);
  });

  it("stops a run whose loss passes 10·F(W₀), NaN from there on, and one already above it at W₀", async () => {
    const specs: RunSpec[] = [
      {
        algorithm: "local",
        stepSize: 40,
        participants: 1,
        localSteps: 4,
        curveRounds: EVERY_ROUND,
        seed: 2,
      },
      {
        algorithm: "minibatch",
        stepSize: 60,
        participants: 1,
        localSteps: 2,
        curveRounds: EVERY_ROUND,
        seed: 2,
      },
      {
        algorithm: "scaffold",
        stepSize: 30,
        participants: 2,
        localSteps: 3,
        curveRounds: EVERY_ROUND,
        seed: 5,
      },
    ];
    const { outcomes } = await checkRuns(
      classification,
      { rounds: 8, batchSize: 5, startValue: Math.log(3) },
      specs,
    );
    expect(outcomes.some((outcome) => outcome.diverged)).toBe(true);
    // F(W₀) = log 3 above a limit of 10·(log 3)/20: diverged at round 0.
    const atStart = await checkRuns(
      classification,
      { rounds: 8, batchSize: 5, startValue: Math.log(3) / 20 },
      [specs[0]],
    );
    expect(atStart.outcomes[0].diverged).toBe(true);
    expect(Array.from(atStart.outcomes[0].suboptimality).every(Number.isNaN)).toBe(true);
  });

  it("reports each round and stops with the signal's reason once aborted", async () => {
    const problem: SimulationProblem = {
      design: classification,
      lambda: LAMBDA,
      optimumValue: OPTIMUM,
      startValue: Math.log(3),
    };
    const plan: TrainingPlan = { participants: 2, localSteps: 2, rounds: 6, batchSize: 4 };
    const rounds: number[] = [];
    await runAlgorithm("local", problem, plan, 0.5, 1, Int32Array.from([0, 6]), {
      onRound: (round) => rounds.push(round),
    });
    expect(rounds).toEqual([1, 2, 3, 4, 5, 6]);
    const controller = new AbortController();
    const stopped: number[] = [];
    const run = runAlgorithm("local", problem, plan, 0.5, 1, Int32Array.from([0, 6]), {
      signal: controller.signal,
      onRound: (round) => {
        stopped.push(round);
        if (round === 2) controller.abort(new Error("stopped by the test"));
      },
    });
    await expect(run).rejects.toThrow("stopped by the test");
    expect(stopped).toEqual([1, 2]);
  });
});
