import { kmeans } from "ml-kmeans";
import type { SeededRandom } from "../../math/random";
import { AnalysisInputError } from "../errors";
import type { LayoutRows, ShardAssignment } from "./layout-rows";
import { randomPermutation } from "./shuffle";

/** k-means is fitted on a uniform sample of at most this many rows (methods.md §8). */
export const CLUSTER_SAMPLE_ROWS = 50_000;

/**
 * `clusters` (methods.md §8): k-means with k = M (ml-kmeans, from the k-means++ start of
 * `seedCentres`, drawn with the plan's generator) on the standardized features, fitted on a uniform sample of at most 50,000 rows; every
 * row then goes to its nearest centre (ties to the lower index) and the shard is the cluster — the
 * feature skew of natural groupings. An empty cluster is an input error suggesting a smaller M.
 */
export function splitClusters(rows: LayoutRows, shardCount: number, random: SeededRandom) {
  const { rows: count, cols, data } = rows.features;
  const width = cols - 1; // the bias is the same for every row
  if (width === 0) {
    throw new AnalysisInputError("clusters needs at least one usable feature column", {
      expected: "numeric or categorical feature columns",
    });
  }
  const sample = randomPermutation(count, random).subarray(0, Math.min(count, CLUSTER_SAMPLE_ROWS));
  const values = new Float64Array(sample.length * width);
  sample.forEach((row, k) => values.set(data.subarray(row * cols, row * cols + width), k * width));
  const points = Array.from(sample, (_, k) =>
    Array.from(values.subarray(k * width, (k + 1) * width)),
  );
  const { centroids } = kmeans(points, shardCount, {
    initialization: seedCentres(values, width, shardCount, random),
  });
  const shards: ShardAssignment = new Int32Array(count);
  const sizes = new Int32Array(shardCount);
  for (let row = 0; row < count; row++) {
    const offset = row * cols;
    let best = 0;
    let bestDistance = Infinity;
    centroids.forEach((centre, m) => {
      let distance = 0;
      for (let j = 0; j < width; j++) distance += (data[offset + j] - centre[j]) ** 2;
      if (distance < bestDistance) {
        bestDistance = distance;
        best = m;
      }
    });
    shards[row] = best;
    sizes[best]++;
  }
  const empty = sizes.indexOf(0);
  if (empty >= 0) {
    throw new AnalysisInputError(
      `clusters: k-means left cluster ${empty + 1} of ${shardCount} empty`,
      {
        expected: "fewer shards than the feature space has distinct clusters: a smaller M",
      },
    );
  }
  return shards;
}

/**
 * The k-means++ start (Arthur & Vassilvitskii, SODA 2007, from memory) in its greedy form, as
 * scikit-learn's and ml-kmeans's: the first centre a uniformly random point, then each next one the
 * best of 2 + ⌊ln k⌋ points drawn with probability proportional to their squared distance to the
 * nearest centre so far — best: leaving the smallest sum of those distances. Written here on one
 * flat array because ml-kmeans's own builds a row object per point and distance (about half of the
 * clustering's time at k = 100 on 50,000 points); the Lloyd iterations stay ml-kmeans's.
 */
export function seedCentres(
  values: Float64Array,
  width: number,
  k: number,
  random: SeededRandom,
): number[][] {
  const count = values.length / width;
  const trials = 2 + Math.floor(Math.log(k));
  const rowAt = (point: number) => values.subarray(point * width, (point + 1) * width);
  const distancesTo = (centre: Float64Array, nearest: Float64Array, into: Float64Array) => {
    let total = 0;
    for (let point = 0; point < count; point++) {
      let distance = 0;
      for (let j = 0, at = point * width; j < width; j++, at++) {
        const difference = values[at] - centre[j];
        distance += difference * difference;
      }
      into[point] = Math.min(distance, nearest[point]);
      total += into[point];
    }
    return total;
  };
  const centres = [rowAt(random.integer(count))];
  let nearest = new Float64Array(count).fill(Infinity);
  let total = distancesTo(centres[0], nearest, nearest);
  let candidate = new Float64Array(count);
  let best = new Float64Array(count);
  const cumulative = new Float64Array(count);
  while (centres.length < k) {
    let running = 0;
    for (let point = 0; point < count; point++) cumulative[point] = running += nearest[point];
    let bestPoint = -1;
    let bestTotal = Infinity;
    for (let trial = 0; trial < trials; trial++) {
      const point = pickByWeight(cumulative, random.uniform() * total);
      const trialTotal = distancesTo(rowAt(point), nearest, candidate);
      if (trialTotal < bestTotal) {
        bestTotal = trialTotal;
        bestPoint = point;
        [best, candidate] = [candidate, best];
      }
    }
    centres.push(rowAt(bestPoint));
    [nearest, best] = [best, nearest];
    total = bestTotal;
  }
  return centres.map((centre) => Array.from(centre));
}

/** The first point whose cumulative weight exceeds `target` (binary search). */
function pickByWeight(cumulative: Float64Array, target: number): number {
  let low = 0;
  let high = cumulative.length - 1;
  while (low < high) {
    const middle = (low + high) >> 1;
    if (cumulative[middle] > target) high = middle;
    else low = middle + 1;
  }
  return low;
}
