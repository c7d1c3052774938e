/**
 * The q-quantile of ascending-sorted values with linear interpolation between order statistics:
 * h = (n − 1) q, result = x_⌊h⌋ + (h − ⌊h⌋)(x_⌊h⌋+1 − x_⌊h⌋). This is NumPy's default
 * `np.quantile(method='linear')`, Hyndman & Fan type 7 (Amer. Statistician 50(4), 1996; from memory).
 *
 * Example: quantileSorted([1, 2, 3, 4], 0.5) is 2.5; quantileSorted([1, 2, 3, 4], 0.1) is 1.3.
 */
export function quantileSorted(sorted: ArrayLike<number>, q: number): number {
  if (sorted.length === 0) throw new RangeError("quantile of an empty array");
  if (!(q >= 0 && q <= 1)) throw new RangeError(`quantile level must be in [0, 1], got ${q}`);
  const position = (sorted.length - 1) * q;
  const below = Math.floor(position);
  const fraction = position - below;
  if (below + 1 >= sorted.length) return sorted[sorted.length - 1];
  return sorted[below] + fraction * (sorted[below + 1] - sorted[below]);
}
