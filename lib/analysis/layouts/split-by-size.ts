import type { SeededRandom } from "../../math/random";
import { AnalysisInputError } from "../errors";
import type { LayoutRows, ShardAssignment } from "./layout-rows";
import { randomPermutation } from "./shuffle";

/** Draws of the shard proportions before `quantity(β)` gives up on leaving a shard empty. */
export const MAX_QUANTITY_DRAWS = 100;

/**
 * `quantity(β)` (methods.md §8; Li et al., ICDE 2022, from memory): shard proportions ~ Dir(β·1_M),
 * sizes by largest remainder (ties to the lower shard), redrawn while a shard would be empty (at most
 * 100 draws, then an input error); rows otherwise uniformly random. Smaller β, more unequal sizes.
 */
export function splitQuantity(
  rows: LayoutRows,
  shardCount: number,
  random: SeededRandom,
  beta: number,
) {
  const total = rows.classes.length;
  const proportions = new Float64Array(shardCount);
  const concentrations = new Array<number>(shardCount).fill(beta);
  for (let draw = 0; draw < MAX_QUANTITY_DRAWS; draw++) {
    const sizes = apportionByLargestRemainder(random.dirichlet(concentrations, proportions), total);
    if (sizes.every((size) => size > 0))
      return dealInSizes(randomPermutation(total, random), sizes);
  }
  throw new AnalysisInputError(
    `quantity(${beta}) left a shard empty in ${MAX_QUANTITY_DRAWS} draws of the shard sizes`,
    { expected: "a larger β or fewer shards" },
  );
}

/**
 * Whole sizes summing to `total` in the given proportions: floors first, then one more to the
 * largest remainders (Hamilton's method), ties to the lower index.
 */
export function apportionByLargestRemainder(proportions: Float64Array, total: number): number[] {
  const sizes = Array.from(proportions, (share) => Math.floor(share * total));
  const short = total - sizes.reduce((sum, size) => sum + size, 0);
  const byRemainder = Array.from(proportions, (share, m) => m).sort(
    (a, b) => proportions[b] * total - sizes[b] - (proportions[a] * total - sizes[a]) || a - b,
  );
  for (let k = 0; k < short; k++) sizes[byRemainder[k % byRemainder.length]]++;
  return sizes;
}

function dealInSizes(order: Int32Array, sizes: number[]): ShardAssignment {
  const shards: ShardAssignment = new Int32Array(order.length);
  let position = 0;
  sizes.forEach((size, shard) => {
    for (let k = 0; k < size; k++) shards[order[position++]] = shard;
  });
  return shards;
}
