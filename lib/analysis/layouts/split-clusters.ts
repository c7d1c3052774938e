import { kmeans } from "ml-kmeans";
import type { SeededRandom } from "../../math/random";
import { AnalysisInputError } from "../errors";
import type { LayoutRows, ShardAssignment } from "./layout-rows";
import { randomPermutation } from "./shuffle";

/** k-means is fitted on a uniform sample of at most this many rows (methods.md §8). */
export const CLUSTER_SAMPLE_ROWS = 50_000;

/**
 * `clusters` (methods.md §8): k-means with k = M (ml-kmeans, k-means++ start seeded from the plan's
 * generator) on the standardized features, fitted on a uniform sample of at most 50,000 rows; every
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
  const points = Array.from(sample, (row) =>
    Array.from(data.subarray(row * cols, row * cols + width)),
  );
  const { centroids } = kmeans(points, shardCount, {
    initialization: "kmeans++",
    seed: random.nextUint32(),
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
