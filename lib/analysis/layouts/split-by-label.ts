import type { SeededRandom } from "../../math/random";
import { AnalysisInputError } from "../errors";
import { listRowsByClass, type LayoutRows, type ShardAssignment } from "./layout-rows";
import { randomPermutation, shuffleInPlace } from "./shuffle";

/**
 * `iid` (methods.md §8): a uniform random permutation; shard m takes positions i with i mod M = m,
 * so sizes are ⌊N/M⌋ or ⌈N/M⌉.
 */
export function splitIid(rows: LayoutRows, shardCount: number, random: SeededRandom) {
  const order = randomPermutation(rows.classes.length, random);
  const shards: ShardAssignment = new Int32Array(order.length);
  order.forEach((row, position) => (shards[row] = position % shardCount));
  return shards;
}

/**
 * `stratified`: per class, in class order, its rows shuffled and dealt round-robin, each class
 * continuing from the shard where the previous one stopped — so every shard holds ⌊n_c/M⌋ or
 * ⌈n_c/M⌉ rows of class c and sizes differ by at most one.
 */
export function splitStratified(rows: LayoutRows, shardCount: number, random: SeededRandom) {
  const shards: ShardAssignment = new Int32Array(rows.classes.length);
  let next = 0;
  for (const members of listRowsByClass(rows)) {
    for (const row of shuffleInPlace(members, random)) {
      shards[row] = next;
      next = (next + 1) % shardCount;
    }
  }
  return shards;
}

/**
 * `dirichlet(α)`: equal sizes (the first N mod M shards of the shuffled order take one row more);
 * shards in a shuffled order each draw qₘ ~ Dir(α·p), α the total concentration of §4, and fill
 * their rows one at a time — a class drawn from qₘ restricted to the classes with rows left
 * (renormalized), then a uniformly random remaining row of it. The scheme of Hsu et al.,
 * arXiv:1909.06335, 2019 (from memory). When a very small α leaves all of qₘ's mass on exhausted
 * classes (it underflows to zero elsewhere) or none anywhere (every gamma draw underflowed), the
 * class is drawn in proportion to the rows left.
 */
export function splitDirichlet(
  rows: LayoutRows,
  shardCount: number,
  random: SeededRandom,
  alpha: number,
) {
  const total = rows.classes.length;
  const remaining = listRowsByClass(rows);
  const left = Int32Array.from(remaining, (members) => members.length);
  const concentrations = Array.from(left, (count) => (alpha * count) / total);
  const mix = new Float64Array(rows.classCount);
  const shards: ShardAssignment = new Int32Array(total);
  const order = randomPermutation(shardCount, random);
  const base = Math.floor(total / shardCount);
  order.forEach((shard, position) => {
    random.dirichlet(concentrations, mix);
    const size = base + (position < total % shardCount ? 1 : 0);
    for (let slot = 0; slot < size; slot++) {
      const c = drawClassWithRowsLeft(mix, left, random);
      const members = remaining[c];
      const pick = random.integer(left[c]);
      shards[members[pick]] = shard;
      members[pick] = members[--left[c]];
    }
  });
  return shards;
}

function drawClassWithRowsLeft(mix: Float64Array, left: Int32Array, random: SeededRandom): number {
  let mass = 0;
  for (let c = 0; c < mix.length; c++) if (left[c] > 0) mass += mix[c];
  // No mass is 0 (the mix sits on exhausted classes) or NaN (every gamma draw underflowed, 0/0).
  const useCounts = !(mass > 0);
  if (useCounts) {
    mass = 0;
    for (let c = 0; c < mix.length; c++) mass += left[c];
  }
  let target = random.uniform() * mass;
  let last = -1;
  for (let c = 0; c < mix.length; c++) {
    if (left[c] === 0) continue;
    last = c;
    target -= useCounts ? left[c] : mix[c];
    if (target < 0) return c;
  }
  // Rounding can leave target a hair above zero after the last class.
  return last;
}

/**
 * `classes(k)` ("#C = k", Li et al., "Federated Learning on Non-IID Data Silos", ICDE 2022, from
 * memory): classes shuffled; shard m holds classes (m·k + j) mod C, j < k, of the shuffled order;
 * each class's rows, shuffled, are split evenly (±1) over its holders in shard order. Every class
 * needs a holder (M·k ≥ C) and at least as many rows as holders, else some rows or some shard's
 * class would be lost: both are input errors.
 */
export function splitClasses(
  rows: LayoutRows,
  shardCount: number,
  random: SeededRandom,
  k: number,
) {
  const classCount = rows.classCount;
  const classOrder = randomPermutation(classCount, random);
  const holders: number[][] = Array.from({ length: classCount }, () => []);
  for (let shard = 0; shard < shardCount; shard++) {
    const held = new Set<number>();
    for (let j = 0; j < k; j++) held.add(classOrder[(shard * k + j) % classCount]);
    for (const c of held) holders[c].push(shard);
  }
  const members = listRowsByClass(rows);
  const unheld = holders.findIndex((list) => list.length === 0);
  if (unheld >= 0) {
    throw new AnalysisInputError(`classes(${k}) over ${shardCount} shards leaves classes unheld`, {
      expected: `shards × k at least the number of classes (${classCount}): a larger k or more shards`,
    });
  }
  const short = holders.findIndex((list, c) => members[c].length < list.length);
  if (short >= 0) {
    throw new AnalysisInputError(
      `classes(${k}): a class has ${members[short].length} rows for ${holders[short].length} shards that hold it`,
      { expected: "at least one row of a class per shard holding it: a smaller k or fewer shards" },
    );
  }
  const shards: ShardAssignment = new Int32Array(rows.classes.length);
  members.forEach((list, c) => {
    shuffleInPlace(list, random);
    list.forEach((row, index) => (shards[row] = holders[c][index % holders[c].length]));
  });
  return shards;
}
