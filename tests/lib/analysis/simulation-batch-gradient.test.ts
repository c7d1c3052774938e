import { beforeAll, describe, expect, it } from "vitest";
import type { Design } from "@/lib/analysis/design";
import {
  addShardBatch,
  clearBatchSums,
  createBatchWorkspace,
  readBatchGradient,
  readBatchLoss,
} from "@/lib/analysis/simulation/batch-gradient";
import { SeededRandom } from "@/lib/math/random";
import { runPythonJson } from "./support/run-python";
import { exportDesign, penguinDesigns } from "./support/simulation-data";

const LAMBDA = 0.05;

/**
 * Outside reference: F_S(W) and ∇F_S(W) of methods.md §2 over a list of rows S (repeats counted
 * each time) in NumPy/SciPy — softmax cross-entropy or half squared error averaged over S, plus
 * (λ/2)‖W without its bias column‖² and its gradient λ·W off the bias column.
 */
const REFERENCE = `import json, sys
import numpy as np
from scipy.special import logsumexp, softmax
d = json.load(sys.stdin)
X = np.array(d["x"]).reshape(d["rows"], d["cols"]); lam = d["lam"]
out = []
for case in d["cases"]:
    W = np.array(case["w"]).reshape(-1, d["cols"]); rows = np.array(case["rows"]); Xs = X[rows]
    mask = np.ones_like(W); mask[:, -1] = 0
    if d["labels"] is not None:
        y = np.array(d["labels"])[rows]; S = Xs @ W.T
        loss = logsumexp(S, axis=1) - S[np.arange(len(rows)), y]
        R = softmax(S, axis=1) - np.eye(W.shape[0])[y]
    else:
        R = (Xs @ W[0] - np.array(d["targets"])[rows])[:, None]; loss = 0.5 * R[:, 0] ** 2
    out.append({"loss": float(loss.mean() + lam / 2 * np.sum((W * mask) ** 2)),
                "gradient": (R.T @ Xs / len(rows) + lam * W * mask).ravel().tolist()})
print(json.dumps(out))`;

let classification: Design;
let regression: Design;

beforeAll(async () => {
  ({ classification, regression } = await penguinDesigns());
});

/** Invented weights with entries of both signs, bias column included. */
function weightsFor(design: Design, scale: number): Float64Array {
  const count = (design.classes?.length ?? 1) * design.x.cols;
  return Float64Array.from({ length: count }, (_, k) => scale * Math.cos(2 + 1.7 * k));
}

/** A generator whose draws are recorded (bound and value), in order. */
function recordingRandom(seed: number) {
  const random = new SeededRandom(seed);
  const draws: { bound: number; value: number }[] = [];
  const integer = random.integer.bind(random);
  random.integer = (bound: number) => {
    const value = integer(bound);
    draws.push({ bound, value });
    return value;
  };
  return { random, draws };
}

interface Case {
  w: number[];
  rows: number[];
}

function expectClose(actual: ArrayLike<number>, expected: number[], what: string) {
  const scale = Math.max(...expected.map(Math.abs));
  for (let k = 0; k < expected.length; k++) {
    expect(Math.abs(actual[k] - expected[k]), `${what}[${k}]`).toBeLessThanOrEqual(1e-13 * scale);
  }
  expect(actual.length).toBe(expected.length);
}

function check(design: Design) {
  const width = design.x.cols;
  const offsets = design.shardOffsets;
  const batchSize = 7;
  const workspace = createBatchWorkspace(design, batchSize);
  const cases: Case[] = [];
  const results: { loss: number; gradient: Float64Array }[] = [];
  const read = (weights: Float64Array) => {
    const gradient = new Float64Array(weights.length);
    readBatchGradient(workspace, weights, width, LAMBDA, gradient);
    results.push({ loss: readBatchLoss(workspace, weights, width, LAMBDA), gradient });
  };
  // Shard 1 (rows offsets[1] … offsets[2] − 1): three batches of 7 rows drawn with replacement,
  // summed together, at one point.
  const { random, draws } = recordingRandom(3);
  const first = weightsFor(design, 0.3);
  clearBatchSums(workspace);
  for (let batch = 0; batch < 3; batch++) {
    addShardBatch(design, offsets[1], offsets[2], batchSize, first, random, workspace);
  }
  read(first);
  expect(draws.every((draw) => draw.bound === offsets[2] - offsets[1])).toBe(true);
  expect(draws).toHaveLength(3 * batchSize);
  cases.push({ w: Array.from(first), rows: draws.map((draw) => offsets[1] + draw.value) });
  // After clearing, one batch of shard 2 at another point: the sums start again.
  const second = weightsFor(design, -0.8);
  clearBatchSums(workspace);
  draws.length = 0;
  addShardBatch(design, offsets[2], offsets[3], batchSize, second, random, workspace);
  read(second);
  cases.push({ w: Array.from(second), rows: draws.map((draw) => offsets[2] + draw.value) });
  // A batch as large as the shard: every row of shard 0 once, nothing drawn (methods.md §7).
  clearBatchSums(workspace);
  draws.length = 0;
  addShardBatch(design, offsets[0], offsets[1], offsets[1] - offsets[0], first, random, workspace);
  read(first);
  expect(draws).toHaveLength(0);
  cases.push({
    w: Array.from(first),
    rows: Array.from({ length: offsets[1] - offsets[0] }, (_, k) => offsets[0] + k),
  });

  const expected = runPythonJson<{ loss: number; gradient: number[] }[]>(REFERENCE, {
    ...exportDesign(design),
    lam: LAMBDA,
    cases,
  });
  results.forEach((result, k) => {
    expectClose([result.loss], [expected[k].loss], `case ${k} loss`);
    expectClose(result.gradient, expected[k].gradient, `case ${k} gradient`);
  });
}

describe("minibatch gradients of the simulation (methods.md §7)", () => {
  it("softmax: F_S and ∇F_S of the drawn rows, with repeats, equal NumPy's", () => {
    check(classification);
  });

  it("least squares: F_S and ∇F_S of the drawn rows equal NumPy's", () => {
    check(regression);
  });
});
