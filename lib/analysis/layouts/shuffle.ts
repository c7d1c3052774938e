import type { SeededRandom } from "../../math/random";

/**
 * Shuffles in place by Fisher–Yates (Durstenfeld's form: Knuth, TAOCP vol. 2, Algorithm 3.4.2P),
 * every permutation equally likely given uniform integers. Returns the array.
 */
export function shuffleInPlace<T extends Int32Array | number[]>(
  values: T,
  random: SeededRandom,
): T {
  for (let i = values.length - 1; i > 0; i--) {
    const j = random.integer(i + 1);
    const swap = values[i];
    values[i] = values[j];
    values[j] = swap;
  }
  return values;
}

/** A uniformly random permutation of 0 … n − 1. */
export function randomPermutation(n: number, random: SeededRandom): Int32Array {
  const order = new Int32Array(n);
  for (let i = 0; i < n; i++) order[i] = i;
  return shuffleInPlace(order, random);
}
