import { jensenShannonDivergence } from "../../math/divergences";
import type { LayoutRows, ShardAssignment } from "./layout-rows";

/**
 * FNV-1a, 32 bits, over the UTF-8 bytes of a string (Fowler, Noll & Vo; offset basis 2166136261,
 * prime 16777619). Example: fnv1a32("a") = 0xe40c292c, fnv1a32("foobar") = 0xbf9cf968 (the FNV
 * test vectors, from memory).
 */
export function fnv1a32(text: string): number {
  let hash = 0x811c9dc5;
  for (const byte of Buffer.from(text, "utf8")) {
    hash ^= byte;
    hash = Math.imul(hash, 0x01000193) >>> 0;
  }
  return hash;
}

/** `group-hash` (methods.md §8): shard = FNV-1a 32-bit hash of the group value mod M. */
export function splitGroupHash(rows: LayoutRows, shardCount: number) {
  const groups = rows.groups as Int32Array;
  const shardOfGroup = rows.groupIds.map((id) => fnv1a32(id) % shardCount);
  return Int32Array.from(groups, (group) => shardOfGroup[group]) satisfies ShardAssignment;
}

export interface GroupBalanceOptions {
  /** μ, the weight of the size term (default 1). */
  sizeWeight: number;
  /** tol: a greedy placement keeps a shard at most (1 + tol)·N/M rows when it can (default 0.1). */
  tolerance: number;
}

export const DEFAULT_GROUP_BALANCE: GroupBalanceOptions = { sizeWeight: 1, tolerance: 0.1 };
/** Improvement passes over the groups at most (methods.md §8). */
export const MAX_BALANCE_PASSES = 20;

/**
 * `group-balanced` (methods.md §8): groups stay whole; minimizes J = weighted mean JS of the shards'
 * label mixes against the pooled mix + μ·CV of the sizes. Greedy: groups by decreasing size, each
 * to the shard with the lowest J after the move among those whose size stays ≤ (1 + tol)·N/M (none
 * fits: the smallest shard); then single-group moves and pair swaps that lower J, at most 20 passes
 * over the groups. Ties go to the lowest shard index. While the greedy runs, J is taken over the
 * rows placed so far (against the pooled mix of all rows); a move never empties a shard.
 */
export function splitGroupBalanced(
  rows: LayoutRows,
  shardCount: number,
  { sizeWeight, tolerance }: GroupBalanceOptions = DEFAULT_GROUP_BALANCE,
) {
  const groups = rows.groups as Int32Array;
  const groupCount = rows.groupIds.length;
  const classCount = rows.classCount;
  const groupCounts = new Float64Array(groupCount * classCount);
  const groupSizes = new Float64Array(groupCount);
  rows.classes.forEach((c, row) => {
    groupCounts[groups[row] * classCount + c]++;
    groupSizes[groups[row]]++;
  });
  const state = new BalanceState(rows, shardCount, sizeWeight);
  const capacity = (1 + tolerance) * (rows.classes.length / shardCount);
  const order = Array.from(groupSizes, (_, g) => g).sort(
    (a, b) => groupSizes[b] - groupSizes[a] || a - b,
  );
  const shardOfGroup = new Int32Array(groupCount).fill(-1);
  for (const g of order) {
    const counts = groupCounts.subarray(g * classCount, (g + 1) * classCount);
    let best = -1;
    let bestJ = Infinity;
    for (let m = 0; m < shardCount; m++) {
      if (state.sizes[m] + groupSizes[g] > capacity) continue;
      const j = state.objectiveAfter([[m, counts, 1]]);
      if (j < bestJ) {
        bestJ = j;
        best = m;
      }
    }
    if (best < 0) best = state.sizes.indexOf(Math.min(...state.sizes));
    state.apply([[best, counts, 1]]);
    shardOfGroup[g] = best;
  }

  const improves = (j: number) => j < state.objective() - 1e-12 * Math.max(1, state.objective());
  for (let pass = 0; pass < MAX_BALANCE_PASSES; pass++) {
    let moved = false;
    for (const g of order) {
      const from = shardOfGroup[g];
      const counts = groupCounts.subarray(g * classCount, (g + 1) * classCount);
      // Moving the group out would empty its shard; swapping it still can't.
      const movable = state.sizes[from] > groupSizes[g];
      let bestMove: Move[] | null = null;
      let bestJ = Infinity;
      for (let to = 0; movable && to < shardCount; to++) {
        if (to === from) continue;
        const move: Move[] = [
          [from, counts, -1],
          [to, counts, 1],
        ];
        const j = state.objectiveAfter(move);
        if (j < bestJ) [bestJ, bestMove] = [j, move];
      }
      if (bestMove && improves(bestJ)) {
        state.apply(bestMove);
        shardOfGroup[g] = bestMove[1][0];
        moved = true;
        continue;
      }
      let bestSwap = -1;
      for (const h of order) {
        const other = shardOfGroup[h];
        if (other === from) continue;
        const countsH = groupCounts.subarray(h * classCount, (h + 1) * classCount);
        const swap: Move[] = [
          [from, counts, -1],
          [other, counts, 1],
          [other, countsH, -1],
          [from, countsH, 1],
        ];
        const j = state.objectiveAfter(swap);
        if (j < bestJ) [bestJ, bestSwap] = [j, h];
      }
      if (bestSwap >= 0 && improves(bestJ)) {
        const other = shardOfGroup[bestSwap];
        const countsH = groupCounts.subarray(bestSwap * classCount, (bestSwap + 1) * classCount);
        state.apply([
          [from, counts, -1],
          [other, counts, 1],
          [other, countsH, -1],
          [from, countsH, 1],
        ]);
        shardOfGroup[g] = other;
        shardOfGroup[bestSwap] = from;
        moved = true;
      }
    }
    if (!moved) break;
  }
  return Int32Array.from(groups, (group) => shardOfGroup[group]) satisfies ShardAssignment;
}

/** A change of one shard's class counts: add (+1) or remove (−1) a group's counts. */
type Move = [shard: number, counts: Float64Array, sign: 1 | -1];

/**
 * Per-shard class counts with J = Σₘ (nₘ/N) JSₘ + μ·CV(n) kept up to date, so a candidate move is
 * priced in O(C) per shard it touches.
 */
class BalanceState {
  readonly sizes: number[];
  private readonly counts: Float64Array[];
  private readonly divergences: Float64Array;
  private readonly pooled: number[];
  private readonly scratch: number[];

  constructor(
    rows: LayoutRows,
    private readonly shardCount: number,
    private readonly sizeWeight: number,
  ) {
    const pooledCounts = new Float64Array(rows.classCount);
    for (const c of rows.classes) pooledCounts[c]++;
    this.pooled = Array.from(pooledCounts, (count) => count / rows.classes.length);
    this.sizes = new Array<number>(shardCount).fill(0);
    this.counts = Array.from({ length: shardCount }, () => new Float64Array(rows.classCount));
    this.divergences = new Float64Array(shardCount);
    this.scratch = new Array<number>(rows.classCount).fill(0);
  }

  objective(): number {
    return this.evaluate(this.sizes, (m) => this.divergences[m]);
  }

  /** J after the moves, without applying them. */
  objectiveAfter(moves: Move[]): number {
    const sizes = [...this.sizes];
    const changed = new Map<number, number>();
    for (const [shard] of moves) {
      if (changed.has(shard)) continue;
      const { size, divergence } = this.shardAfter(shard, moves);
      sizes[shard] = size;
      changed.set(shard, divergence);
    }
    return this.evaluate(sizes, (m) => changed.get(m) ?? this.divergences[m]);
  }

  apply(moves: Move[]): void {
    for (const [shard, counts, sign] of moves) {
      for (let c = 0; c < counts.length; c++) this.counts[shard][c] += sign * counts[c];
    }
    for (const [shard] of moves) {
      this.sizes[shard] = this.counts[shard].reduce((sum, count) => sum + count, 0);
      this.divergences[shard] = this.divergenceOf(this.counts[shard], this.sizes[shard]);
    }
  }

  private shardAfter(shard: number, moves: Move[]): { size: number; divergence: number } {
    const after = this.counts[shard].slice();
    for (const [target, counts, sign] of moves) {
      if (target !== shard) continue;
      for (let c = 0; c < counts.length; c++) after[c] += sign * counts[c];
    }
    const size = after.reduce((sum, count) => sum + count, 0);
    return { size, divergence: this.divergenceOf(after, size) };
  }

  private divergenceOf(counts: Float64Array, size: number): number {
    if (size === 0) return 0;
    for (let c = 0; c < counts.length; c++) this.scratch[c] = counts[c] / size;
    return jensenShannonDivergence(this.scratch, this.pooled);
  }

  private evaluate(sizes: number[], divergence: (shard: number) => number): number {
    let placed = 0;
    let weighted = 0;
    let squares = 0;
    for (let m = 0; m < this.shardCount; m++) {
      placed += sizes[m];
      weighted += sizes[m] * divergence(m);
      squares += sizes[m] * sizes[m];
    }
    if (placed === 0) return 0;
    const mean = placed / this.shardCount;
    const variance = Math.max(0, squares / this.shardCount - mean * mean);
    return weighted / placed + this.sizeWeight * (Math.sqrt(variance) / mean);
  }
}
