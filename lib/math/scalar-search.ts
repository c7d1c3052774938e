const INVERSE_GOLDEN_RATIO = (Math.sqrt(5) - 1) / 2;

export interface ScalarMaximum {
  argument: number;
  value: number;
}

/**
 * Maximizes f on [lower, upper]: a grid of `gridPoints` evenly spaced points locates the best
 * bracket (guarding against a local maximum), then golden-section search narrows it until the
 * bracket is at most `tolerance` wide.
 * Source: Kiefer, Proc. AMS 4 (1953), golden-section search (from memory); the grid is common practice.
 *
 * Example: maximizeOnInterval(x => −(x − 2)², 0, 5) returns argument 2 (to 1e-9) and value 0.
 */
export function maximizeOnInterval(
  objective: (x: number) => number,
  lower: number,
  upper: number,
  { gridPoints = 64, tolerance = 1e-9 }: { gridPoints?: number; tolerance?: number } = {},
): ScalarMaximum {
  if (!(upper > lower)) throw new RangeError(`empty interval [${lower}, ${upper}]`);
  const step = (upper - lower) / (gridPoints - 1);
  let bestIndex = 0;
  let bestValue = -Infinity;
  for (let index = 0; index < gridPoints; index++) {
    const value = objective(lower + index * step);
    if (value > bestValue) {
      bestValue = value;
      bestIndex = index;
    }
  }
  let left = lower + Math.max(0, bestIndex - 1) * step;
  let right = lower + Math.min(gridPoints - 1, bestIndex + 1) * step;
  let inner1 = right - INVERSE_GOLDEN_RATIO * (right - left);
  let inner2 = left + INVERSE_GOLDEN_RATIO * (right - left);
  let value1 = objective(inner1);
  let value2 = objective(inner2);
  while (right - left > tolerance) {
    if (value1 >= value2) {
      right = inner2;
      inner2 = inner1;
      value2 = value1;
      inner1 = right - INVERSE_GOLDEN_RATIO * (right - left);
      value1 = objective(inner1);
    } else {
      left = inner1;
      inner1 = inner2;
      value1 = value2;
      inner2 = left + INVERSE_GOLDEN_RATIO * (right - left);
      value2 = objective(inner2);
    }
  }
  const candidates: ScalarMaximum[] = [
    { argument: (left + right) / 2, value: objective((left + right) / 2) },
    { argument: lower + bestIndex * step, value: bestValue },
  ];
  return candidates[0].value >= candidates[1].value ? candidates[0] : candidates[1];
}
