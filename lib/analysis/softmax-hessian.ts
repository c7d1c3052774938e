import { accumulateWeightedGramUpper } from "../math/gram";
import type { Matrix } from "../math/matrix";
import { softmaxInPlace } from "../math/softmax";

/**
 * pᵢ = softmax(W x̃ᵢ) for every row x̃ᵢ of the design matrix `x`, rows × C row-major (the inputs of
 * the Hessian blocks below).
 */
export function computeClassProbabilities(x: Matrix, weights: Float64Array): Float64Array {
  const width = x.cols;
  const values = x.data;
  const classCount = weights.length / width;
  const probabilities = new Float64Array(x.rows * classCount);
  for (let row = 0; row < x.rows; row++) {
    const offset = row * classCount;
    for (let c = 0; c < classCount; c++) {
      let score = 0;
      for (let j = 0; j < width; j++) score += weights[c * width + j] * values[row * width + j];
      probabilities[offset + c] = score;
    }
    softmaxInPlace(probabilities, offset, classCount);
  }
  return probabilities;
}

/** Number of class pairs (a, b) with a ≤ b: the blocks of the softmax Hessian that are computed. */
export function countClassPairs(classCount: number): number {
  return (classCount * (classCount + 1)) / 2;
}

/** The class pair (a, b), a ≤ b, of block number `pair` in row-major order of the upper triangle. */
export function classPairAt(pair: number, classCount: number): [number, number] {
  let a = 0;
  let remaining = pair;
  while (remaining >= classCount - a) {
    remaining -= classCount - a;
    a++;
  }
  return [a, a + remaining];
}

/**
 * Writes block (a, b) of the data term of the softmax Hessian into `block` (width × width, upper
 * triangle): (1/n) Σᵢ (δ_ab p_ia − p_ia p_ib) x̃ᵢ x̃ᵢᵀ. Every block is symmetric, so the upper triangle
 * holds it. `rowWeights` (length n) is scratch space.
 * Formula: ∇²ℓᵢ = (diag(pᵢ) − pᵢpᵢᵀ) ⊗ x̃ᵢx̃ᵢᵀ for ℓᵢ = −log softmax(W x̃ᵢ)_{yᵢ} (standard; e.g.
 * Böhning, Ann. Inst. Stat. Math. 1992, from memory).
 */
export function computeHessianBlock(
  x: Matrix,
  probabilities: Float64Array,
  [a, b]: [number, number],
  rowWeights: Float64Array,
  block: Float64Array,
): void {
  const rows = x.rows;
  const classCount = probabilities.length / rows;
  for (let row = 0; row < rows; row++) {
    const pa = probabilities[row * classCount + a];
    const pb = probabilities[row * classCount + b];
    rowWeights[row] = ((a === b ? pa : 0) - pa * pb) / rows;
  }
  block.fill(0);
  accumulateWeightedGramUpper(x, rowWeights, 0, rows, block);
}

/**
 * Assembles the full Hessian ∇²F (C·width square, parameters ordered class by class as W is) from
 * the upper-triangle blocks of `computeHessianBlock` (in `classPairAt` order), adding the
 * regularizer λ on every weight but the biases (methods.md §2).
 */
export function assembleSoftmaxHessian(
  blocks: Float64Array[],
  classCount: number,
  width: number,
  lambda: number,
): Float64Array {
  const size = classCount * width;
  const hessian = new Float64Array(size * size);
  blocks.forEach((block, pair) => {
    const [a, b] = classPairAt(pair, classCount);
    for (let j = 0; j < width; j++) {
      for (let k = j; k < width; k++) {
        const value = block[j * width + k];
        hessian[(a * width + j) * size + b * width + k] = value;
        hessian[(a * width + k) * size + b * width + j] = value;
        hessian[(b * width + j) * size + a * width + k] = value;
        hessian[(b * width + k) * size + a * width + j] = value;
      }
    }
  });
  for (let k = 0; k < size; k++) if (k % width !== width - 1) hessian[k * size + k] += lambda;
  return hessian;
}
