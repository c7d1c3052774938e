// The clusters generator's Lloyd iterations against ml-kmeans 7.0.1 (an outside k-means package,
// kept as a development dependency for this check): from the same start, the same centres bit for
// bit and the same number of iterations, on open data and on data with exact ties.
import { kmeans } from "ml-kmeans";
import { describe, expect, it } from "vitest";
import { generateLayout } from "@/lib/analysis/layouts/generators";
import type { ShareKMeansRows } from "@/lib/analysis/layouts/kmeans-steps";
import { runLloydIterations } from "@/lib/analysis/layouts/lloyd-iterations";
import { seedCentres } from "@/lib/analysis/layouts/split-clusters";
import { PassPool } from "@/lib/analysis/pass-pool";
import { SeededRandom } from "@/lib/math/random";
import { standardizedPenguinMeasurements } from "./support";

function rowsOf(values: Float64Array, width: number): number[][] {
  return Array.from({ length: values.length / width }, (_, row) =>
    Array.from(values.subarray(row * width, (row + 1) * width)),
  );
}

function expectSameAsPackage(
  values: Float64Array,
  width: number,
  start: Float64Array,
  share?: ShareKMeansRows,
): void {
  const k = start.length / width;
  const ours = runLloydIterations(values, width, start, share);
  const theirs = kmeans(rowsOf(values, width), k, { initialization: rowsOf(start, width) });
  expect(Array.from(ours.centres)).toEqual(theirs.centroids.flat());
  expect(ours.iterations).toBe(theirs.iterations);
  expect(ours.converged).toBe(theirs.converged);
}

describe("Lloyd iterations", () => {
  it("give ml-kmeans's centres on the penguins' measurements", () => {
    const { values, width } = standardizedPenguinMeasurements();
    for (const k of [3, 12, 40]) {
      expectSameAsPackage(values, width, seedCentres(values, width, k, new SeededRandom(k)));
    }
  });

  it("give ml-kmeans's centres on seeded data in 31 dimensions, after 41 iterations", () => {
    const random = new SeededRandom(5);
    const width = 31;
    const values = Float64Array.from({ length: 4000 * width }, () => random.normal());
    const start = seedCentres(values, width, 60, random);
    expect(runLloydIterations(values, width, start).iterations).toBeGreaterThan(10); // the bounds carry over many iterations
    expectSameAsPackage(values, width, start);
  });

  // Small integers on a line, many repeated, with centres that are means of a few of them: a point
  // often lies exactly halfway between two centres, in later iterations too, and the lower index
  // must win as in a full scan (a quarter of these cases go wrong when the higher one wins).
  it("break exact ties towards the lower centre as ml-kmeans does", () => {
    for (let trial = 0; trial < 200; trial++) {
      const random = new SeededRandom(trial);
      const values = Float64Array.from({ length: 40 }, () => random.integer(7));
      const start = Float64Array.from({ length: 4 }, () => values[random.integer(40)]);
      expectSameAsPackage(values, 1, start);
    }
  });

  // The pass pool's two threads share the per-point steps, chunk by chunk (4,096 points each):
  // the start, the centres and the final layout must not depend on it.
  it("give ml-kmeans's centres when two threads share the steps, and the same clusters layout", async () => {
    const random = new SeededRandom(8);
    const width = 6;
    const values = Float64Array.from({ length: 13_000 * width }, () => random.normal());
    const pool = new PassPool(2);
    try {
      await pool.whenReady();
      const share: ShareKMeansRows = (rows) => pool.shareKMeansRows(rows);
      const start = seedCentres(values, width, 40, new SeededRandom(2), share);
      expect(start).toEqual(seedCentres(values, width, 40, new SeededRandom(2)));
      expectSameAsPackage(values, width, start, share);
      // The design's matrix: each point's features, then the bias.
      const design = new Float64Array(13_000 * (width + 1)).fill(1);
      for (let row = 0; row < 13_000; row++) {
        design.set(values.subarray(row * width, (row + 1) * width), row * (width + 1));
      }
      const rows = {
        classes: new Int32Array(13_000),
        classCount: 1,
        features: { rows: 13_000, cols: width + 1, data: design },
        groups: null,
        groupIds: [],
      };
      const threaded = generateLayout({ generator: "clusters" }, rows, 25, 4, share);
      expect(Array.from(threaded)).toEqual(
        Array.from(generateLayout({ generator: "clusters" }, rows, 25, 4)),
      );
      expect(pool.tasksRunByWorkers).toBeGreaterThan(0);
    } finally {
      await pool.close();
    }
  }, 60_000);
});
