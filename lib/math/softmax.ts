/**
 * Replaces values[offset..offset+length) by softmax(values) in place and returns log Σ exp(values)
 * (the log-sum-exp of the inputs).
 *
 * Formula: softmax(z)_c = exp(z_c − m) / Σ_k exp(z_k − m) with m = max_k z_k, and
 * log Σ exp(z) = m + log Σ_k exp(z_k − m). Subtracting the maximum keeps every exponent ≤ 0, so
 * nothing overflows and at least one term is 1 (the log-sum-exp trick; common practice).
 *
 * Example: z = [1, 2, 3] becomes [0.09003057317038046, 0.24472847105479764, 0.6652409557748219]
 * and the return value is 3.4076059644443806 (= log(e + e² + e³)).
 */
export function softmaxInPlace(values: Float64Array, offset: number, length: number): number {
  let largest = -Infinity;
  for (let index = offset; index < offset + length; index++) {
    if (values[index] > largest) largest = values[index];
  }
  let total = 0;
  for (let index = offset; index < offset + length; index++) {
    const shifted = Math.exp(values[index] - largest);
    values[index] = shifted;
    total += shifted;
  }
  const inverse = 1 / total;
  for (let index = offset; index < offset + length; index++) values[index] *= inverse;
  return largest + Math.log(total);
}
