import { accumulateWeightedGramUpper } from "../math/gram";
import { softmaxInPlace } from "../math/softmax";
import type { Design } from "./design";

/**
 * pᵢ = softmax(W x̃ᵢ) for every row of a classification design, rows × C row-major (the inputs of
 * the Hessian blocks below).
 */
export function computeClassProbabilities(design: Design, weights: Float64Array): Float64Array {
  const width = design.x.cols;
  const x = design.x.data;
  const classCount = weights.length / width;
  const probabilities = new Float64Array(design.x.rows * classCount);
  for (let row = 0; row < design.x.rows; row++) {
    const offset = row * classCount;
    for (let c = 0; c < classCount; c++) {
      let score = 0;
      for (let j = 0; j < width; j++) score += weights[c * width + j] * x[row * width + j];
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
  design: Design,
  probabilities: Float64Array,
  [a, b]: [number, number],
  rowWeights: Float64Array,
  block: Float64Array,
): void {
  const rows = design.x.rows;
  const classCount = probabilities.length / rows;
  for (let row = 0; row < rows; row++) {
    const pa = probabilities[row * classCount + a];
    const pb = probabilities[row * classCount + b];
    rowWeights[row] = ((a === b ? pa : 0) - pa * pb) / rows;
  }
  block.fill(0);
  accumulateWeightedGramUpper(design.x, rowWeights, 0, rows, block);
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

/**
 * ∇²F(W) of the softmax objective over all rows of `design` (methods.md §2), C·width square.
 *
 * Example: at W = 0 with C classes every pᵢ is uniform, so block (a, b) is (δ_ab/C − 1/C²) X̃ᵀX̃/n.
 */
export function computeSoftmaxHessian(
  design: Design,
  weights: Float64Array,
  lambda: number,
): Float64Array {
  const width = design.x.cols;
  const classCount = weights.length / width;
  const probabilities = computeClassProbabilities(design, weights);
  const rowWeights = new Float64Array(design.x.rows);
  const blocks = Array.from({ length: countClassPairs(classCount) }, (_, pair) => {
    const block = new Float64Array(width * width);
    computeHessianBlock(design, probabilities, classPairAt(pair, classCount), rowWeights, block);
    return block;
  });
  return assembleSoftmaxHessian(blocks, classCount, width, lambda);
}
