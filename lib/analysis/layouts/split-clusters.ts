import type { SeededRandom } from "../../math/random";
import { AnalysisInputError } from "../errors";
import {
  onThisThread,
  sharedDoubles,
  sharedIntegers,
  type NearestCentres,
  type ShareKMeansRows,
} from "./kmeans-steps";
import type { LayoutRows, ShardAssignment } from "./layout-rows";
import { runLloydIterations } from "./lloyd-iterations";
import { randomPermutation } from "./shuffle";

/** k-means is fitted on a uniform sample of at most this many rows (methods.md §8). */
export const CLUSTER_SAMPLE_ROWS = 50_000;

/**
 * `clusters` (methods.md §8): k-means with k = M (ml-kmeans's Lloyd iterations, reproduced bit for
 * bit by `runLloydIterations`, from the k-means++ start of `seedCentres`, drawn with the plan's
 * generator) on the standardized features, fitted on a uniform sample of at most 50,000 rows; every
 * row then goes to its nearest centre (ties to the lower index) and the shard is the cluster — the
 * feature skew of natural groupings. An empty cluster is an input error suggesting a smaller M.
 */
export function splitClusters(
  rows: LayoutRows,
  shardCount: number,
  random: SeededRandom,
  share: ShareKMeansRows = onThisThread,
): ShardAssignment {
  const { rows: count, cols, data } = rows.features;
  const width = cols - 1; // the bias is the same for every row
  if (width === 0) {
    throw new AnalysisInputError("clusters needs at least one usable feature column", {
      expected: "numeric or categorical feature columns",
    });
  }
  const sample = randomPermutation(count, random).subarray(0, Math.min(count, CLUSTER_SAMPLE_ROWS));
  const values = sharedDoubles(sample.length * width);
  sample.forEach((row, k) => values.set(data.subarray(row * cols, row * cols + width), k * width));
  const { centres } = runLloydIterations(
    values,
    width,
    seedCentres(values, width, shardCount, random, share),
    share,
  );
  const shards = sharedIntegers(count);
  share(rows.features).run({ kind: "nearest-centre", centres, shards });
  const sizes = new Int32Array(shardCount);
  for (const shard of shards) sizes[shard]++;
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
 * flat array because ml-kmeans's own builds a row object per point and distance. A trial centre
 * at more than twice a point's distance from the point's nearest centre cannot be nearer (triangle
 * inequality), so that distance is not measured: the sums, and so the centres, are those of
 * measuring every distance, in a fraction of the time once a few centres are placed. The distances
 * are measured on the rows `share` makes of the points (see runLloydIterations), their sums taken
 * in point order on this thread.
 * Returns the k centres, k × width row-major.
 */
export function seedCentres(
  values: Float64Array,
  width: number,
  k: number,
  random: SeededRandom,
  share: ShareKMeansRows = onThisThread,
): Float64Array {
  const count = values.length / width;
  const trialCount = 2 + Math.floor(Math.log(k));
  const centres = new Float64Array(k * width);
  const points = share({ rows: count, cols: width, data: values });
  const createNearest = (): NearestCentres => ({
    distance: sharedDoubles(count),
    centre: sharedIntegers(count),
  });
  // Per point the squared distance to its nearest centre so far and that centre's index; the
  // same for each trial of a round (the best one's become the nearest).
  let nearest = createNearest();
  nearest.distance.fill(Infinity);
  const candidates = Array.from({ length: trialCount }, createNearest);
  const trials = sharedIntegers(trialCount);
  const centreToCentre = sharedDoubles(trialCount * k);
  // The distances to every trial of a round in one step (a round's draws do not depend on
  // them), then each trial's sum in point order.
  const measureTrials = (placed: number, into: NearestCentres[]): number[] => {
    trials.forEach((point, trial) => {
      for (let c = 0; c < placed; c++) {
        let distance = 0;
        for (let j = 0; j < width; j++) {
          const difference = values[point * width + j] - centres[c * width + j];
          distance += difference * difference;
        }
        centreToCentre[trial * k + c] = distance;
      }
    });
    points.run({ kind: "seed-distances", trials, placed, centreToCentre, nearest, into });
    return into.map(({ distance }) => {
      let total = 0;
      for (let other = 0; other < count; other++) total += distance[other];
      return total;
    });
  };
  const place = (point: number, placed: number) =>
    centres.set(values.subarray(point * width, (point + 1) * width), placed * width);

  const first = random.integer(count);
  trials[0] = first;
  let [total] = measureTrials(0, [nearest]);
  place(first, 0);
  const cumulative = new Float64Array(count);
  for (let placed = 1; placed < k; placed++) {
    let running = 0;
    for (let point = 0; point < count; point++)
      cumulative[point] = running += nearest.distance[point];
    for (let trial = 0; trial < trialCount; trial++) {
      trials[trial] = pickByWeight(cumulative, random.uniform() * total);
    }
    const totals = measureTrials(placed, candidates);
    let best = 0;
    for (let trial = 1; trial < trialCount; trial++) if (totals[trial] < totals[best]) best = trial;
    place(trials[best], placed);
    [nearest, candidates[best]] = [candidates[best], nearest];
    total = totals[best];
  }
  return centres;
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
