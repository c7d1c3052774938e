/**
 * Distances between two discrete distributions q and p over the same categories (arrays of equal
 * length, each summing to one). Terms with q_c = 0 contribute 0 (the limit x log x → 0).
 */

/**
 * Total variation ½ Σ_c |q_c − p_c| (common practice).
 *
 * Example: totalVariation([1, 0], [0.5, 0.5]) is 0.5.
 */
export function totalVariation(q: ArrayLike<number>, p: ArrayLike<number>): number {
  let total = 0;
  for (let c = 0; c < q.length; c++) total += Math.abs(q[c] - p[c]);
  return total / 2;
}

/**
 * Hellinger distance √(1 − Σ_c √(q_c p_c)) in the ½-convention (range [0, 1]; common practice).
 * The Bhattacharyya coefficient is clipped at 1 so rounding cannot make the root negative.
 *
 * Example: hellingerDistance([1, 0], [0.5, 0.5]) = √(1 − √0.5) = 0.5411961001461969.
 */
export function hellingerDistance(q: ArrayLike<number>, p: ArrayLike<number>): number {
  let coefficient = 0;
  for (let c = 0; c < q.length; c++) coefficient += Math.sqrt(q[c] * p[c]);
  return Math.sqrt(Math.max(0, 1 - coefficient));
}

/**
 * Kullback–Leibler divergence KL(q‖p) = Σ_c q_c ln(q_c / p_c) in nats; Infinity when some q_c > 0
 * has p_c = 0. Source: Kullback, "Information Theory and Statistics", 1959 (from memory).
 *
 * Example (Kullback's, via methods.md §4): KL([0.36, 0.48, 0.16] ‖ uniform) = 0.0852996 nats.
 */
export function klDivergence(q: ArrayLike<number>, p: ArrayLike<number>): number {
  let total = 0;
  for (let c = 0; c < q.length; c++) {
    if (q[c] > 0) total += q[c] * Math.log(q[c] / p[c]);
  }
  return Math.max(0, total);
}

/**
 * Jensen–Shannon divergence ½KL(q‖m) + ½KL(p‖m), m = (q + p)/2, natural log (nats, at most ln 2).
 * This is the divergence itself, not its square root. Source: Lin, IEEE Trans. Inf. Theory 37(1),
 * 1991 (from memory).
 *
 * Example: jensenShannonDivergence([1, 0], [0.5, 0.5]) = 0.21576155433883565, whose square root is
 * SciPy's documented jensenshannon([1, 0], [.5, .5]) = 0.46450140402245893.
 */
export function jensenShannonDivergence(q: ArrayLike<number>, p: ArrayLike<number>): number {
  let total = 0;
  for (let c = 0; c < q.length; c++) {
    const middle = (q[c] + p[c]) / 2;
    if (q[c] > 0) total += q[c] * Math.log(q[c] / middle);
    if (p[c] > 0) total += p[c] * Math.log(p[c] / middle);
  }
  return Math.max(0, total / 2);
}

/**
 * Shannon entropy −Σ_c q_c ln q_c in nats (common practice).
 *
 * Example: shannonEntropy([0.5, 0.5]) = ln 2 = 0.6931471805599453.
 */
export function shannonEntropy(q: ArrayLike<number>): number {
  let total = 0;
  for (let c = 0; c < q.length; c++) if (q[c] > 0) total -= q[c] * Math.log(q[c]);
  return total;
}
