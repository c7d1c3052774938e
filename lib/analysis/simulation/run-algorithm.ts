import { SeededRandom } from "../../math/random";
import { countWeightRows } from "../objective";
import { accumulateLoss } from "../objective-pass";
import {
  addShardBatch,
  clearBatchSums,
  createBatchWorkspace,
  readBatchGradient,
  readBatchLoss,
  type BatchWorkspace,
  type SimulationDesign,
} from "./batch-gradient";

export type AlgorithmName = "minibatch" | "local" | "scaffold";

/** The objective the algorithms minimize: the engine's F on its design (methods.md §2). */
export interface SimulationProblem {
  design: SimulationDesign;
  lambda: number;
  /** F(W*), from the engine's fit. */
  optimumValue: number;
  /** F(W₀) at the start W₀ = 0; a run whose loss exceeds ten times this is discarded. */
  startValue: number;
}

/** The team's training plan (methods.md §5). */
export interface TrainingPlan {
  participants: number;
  localSteps: number;
  rounds: number;
  batchSize: number;
}

export interface RunOutcome {
  /** F(W_r) − F(W*) at each round of `curveRounds`; NaN from the point a divergence stopped the run. */
  suboptimality: Float64Array;
  /** The loss became non-finite or exceeded 10·F(W₀) (methods.md §7). */
  diverged: boolean;
}

export interface RunHooks {
  /** Called after each round (1 … R). */
  onRound?: (round: number) => void;
  /** Checked every round; the run throws the signal's reason once it is aborted. */
  signal?: AbortSignal;
}

/**
 * A run yields to the event loop at most this often, so an abort or a progress write from elsewhere
 * can get through; when it yields does not change any number.
 */
const YIELD_INTERVAL_MS = 50;

/** A run's loss above this multiple of F(W₀) counts as diverged (methods.md §7). */
export const DIVERGENCE_FACTOR = 10;

/**
 * One run of one algorithm of methods.md §7 from W₀ = 0 with step size η and the generator
 * xoshiro128** seeded by `seed`. Each round the participants are drawn, then each participant draws
 * K batches of b rows in participant order, the same way for every algorithm — so the three
 * algorithms see the same rows on the same seed (common random numbers), and with K = 1 local SGD
 * and minibatch SGD take the same steps.
 *
 *  - minibatch: gₘ = ∇F on the K·b rows at W; W ← W − η Σ pₘ gₘ.
 *  - local (federated averaging): K steps y ← y − η ∇f_batch(y) from W; W ← Σ pₘ yₘ.
 *  - scaffold (option II, size-weighted): y ← y − η(∇f_batch(y) − cₘ + c);
 *    cₘ⁺ = cₘ − c + (W − y)/(Kη); W ← Σ pₘ yₘ; c ← c + Σ_{m∈S} wₘ(cₘ⁺ − cₘ) with wₘ = nₘ/N
 *    (Karimireddy et al., "SCAFFOLD", ICML 2020, Algorithm 1, there with equal client weights).
 * pₘ are the participants' wₘ renormalized to sum to one within the round.
 *
 * F is evaluated on all rows at the rounds in `curveRounds` (increasing, starting at 0); the weights'
 * finiteness is checked every round.
 */
export async function runAlgorithm(
  algorithm: AlgorithmName,
  problem: SimulationProblem,
  plan: TrainingPlan,
  stepSize: number,
  seed: number,
  curveRounds: Int32Array,
  hooks: RunHooks = {},
): Promise<RunOutcome> {
  const { design, lambda } = problem;
  const width = design.x.cols;
  const parameterCount = countWeightRows(design) * width;
  const shardCount = design.shardOffsets.length - 1;
  const offsets = design.shardOffsets;
  const totalRows = design.x.rows;
  const { participants, localSteps, rounds, batchSize } = plan;

  const random = new SeededRandom(seed);
  const workspace = createBatchWorkspace(design, batchSize);
  const server = new Float64Array(parameterCount);
  const next = new Float64Array(parameterCount);
  const local = new Float64Array(parameterCount);
  const gradient = new Float64Array(parameterCount);
  const order = Int32Array.from({ length: shardCount }, (_, m) => m);
  const chosen = new Int32Array(participants);
  const serverControl = algorithm === "scaffold" ? new Float64Array(parameterCount) : null;
  const controlChange = algorithm === "scaffold" ? new Float64Array(parameterCount) : null;
  const clientControls =
    algorithm === "scaffold" ? new Float64Array(shardCount * parameterCount) : null;

  const suboptimality = new Float64Array(curveRounds.length).fill(Number.NaN);
  const limit = DIVERGENCE_FACTOR * problem.startValue;
  let curveIndex = 0;
  const recordIfOnCurve = (round: number): boolean => {
    if (curveIndex >= curveRounds.length || curveRounds[curveIndex] !== round) return true;
    const value = evaluateAllRows(design, server, lambda, workspace);
    if (!Number.isFinite(value) || value > limit) return false;
    suboptimality[curveIndex++] = value - problem.optimumValue;
    return true;
  };
  if (!recordIfOnCurve(0)) return { suboptimality, diverged: true };

  let lastYield = performance.now();
  for (let round = 1; round <= rounds; round++) {
    if (performance.now() - lastYield > YIELD_INTERVAL_MS) {
      await new Promise((resolve) => setImmediate(resolve));
      lastYield = performance.now();
    }
    hooks.signal?.throwIfAborted();
    chooseParticipants(random, order, chosen);
    let chosenRows = 0;
    for (let i = 0; i < participants; i++)
      chosenRows += offsets[chosen[i] + 1] - offsets[chosen[i]];
    next.fill(0);
    controlChange?.fill(0);
    for (let i = 0; i < participants; i++) {
      const m = chosen[i];
      const shardStart = offsets[m];
      const shardEnd = offsets[m + 1];
      const share = (shardEnd - shardStart) / chosenRows;
      if (algorithm === "minibatch") {
        clearBatchSums(workspace);
        for (let step = 0; step < localSteps; step++) {
          addShardBatch(design, shardStart, shardEnd, batchSize, server, random, workspace);
        }
        readBatchGradient(workspace, server, width, lambda, gradient);
        for (let k = 0; k < parameterCount; k++) next[k] += share * gradient[k];
        continue;
      }
      local.set(server);
      const controlBase = m * parameterCount;
      for (let step = 0; step < localSteps; step++) {
        clearBatchSums(workspace);
        addShardBatch(design, shardStart, shardEnd, batchSize, local, random, workspace);
        readBatchGradient(workspace, local, width, lambda, gradient);
        if (clientControls !== null && serverControl !== null) {
          for (let k = 0; k < parameterCount; k++) {
            local[k] -=
              stepSize * (gradient[k] - clientControls[controlBase + k] + serverControl[k]);
          }
        } else {
          for (let k = 0; k < parameterCount; k++) local[k] -= stepSize * gradient[k];
        }
      }
      if (clientControls !== null && serverControl !== null && controlChange !== null) {
        const globalShare = (shardEnd - shardStart) / totalRows;
        const inverseTravel = 1 / (localSteps * stepSize);
        for (let k = 0; k < parameterCount; k++) {
          const before = clientControls[controlBase + k];
          const after = before - serverControl[k] + (server[k] - local[k]) * inverseTravel;
          controlChange[k] += globalShare * (after - before);
          clientControls[controlBase + k] = after;
        }
      }
      for (let k = 0; k < parameterCount; k++) next[k] += share * local[k];
    }
    if (algorithm === "minibatch") {
      for (let k = 0; k < parameterCount; k++) server[k] -= stepSize * next[k];
    } else {
      server.set(next);
    }
    if (serverControl !== null && controlChange !== null) {
      for (let k = 0; k < parameterCount; k++) serverControl[k] += controlChange[k];
    }
    hooks.onRound?.(round);
    if (!isFiniteVector(server) || !recordIfOnCurve(round)) {
      return { suboptimality, diverged: true };
    }
  }
  return { suboptimality, diverged: false };
}

/**
 * Writes a uniform draw of `chosen.length` distinct shards, ascending, into `chosen` (a partial
 * Fisher–Yates shuffle of `order`). With every shard taking part nothing is drawn.
 */
function chooseParticipants(random: SeededRandom, order: Int32Array, chosen: Int32Array): void {
  const count = order.length;
  const wanted = chosen.length;
  if (wanted === count) {
    for (let i = 0; i < count; i++) chosen[i] = i;
    return;
  }
  for (let i = 0; i < wanted; i++) {
    const j = i + random.integer(count - i);
    const swap = order[i];
    order[i] = order[j];
    order[j] = swap;
  }
  // Ascending order fixes the order of the floating-point sums over participants.
  for (let i = 0; i < wanted; i++) {
    const value = order[i];
    let slot = i;
    while (slot > 0 && chosen[slot - 1] > value) {
      chosen[slot] = chosen[slot - 1];
      slot--;
    }
    chosen[slot] = value;
  }
}

/**
 * F(W) over every row (methods.md §2), with the run's buffers. A loss-only pass: the curve needs F,
 * not ∇F, and skipping the gradient saves about a third of the pass without changing F's bits.
 */
function evaluateAllRows(
  design: SimulationDesign,
  weights: Float64Array,
  lambda: number,
  workspace: BatchWorkspace,
): number {
  clearBatchSums(workspace);
  accumulateLoss(design, weights, 0, design.x.rows, workspace.totals, workspace.pass);
  return readBatchLoss(workspace, weights, design.x.cols, lambda);
}

function isFiniteVector(values: Float64Array): boolean {
  for (let k = 0; k < values.length; k++) if (!Number.isFinite(values[k])) return false;
  return true;
}
