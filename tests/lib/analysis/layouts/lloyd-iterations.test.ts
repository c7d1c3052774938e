// The clusters generator's Lloyd iterations against ml-kmeans 7.0.1 (an outside k-means package,
// kept as a development dependency for this check): from the same start, the same centres bit for
// bit and the same number of iterations, on open data and on data with exact ties.
import { kmeans } from "ml-kmeans";
import { describe, expect, it } from "vitest";
import { runLloydIterations } from "@/lib/analysis/layouts/lloyd-iterations";
import { seedCentres } from "@/lib/analysis/layouts/split-clusters";
import { SeededRandom } from "@/lib/math/random";
import { loadPenguinsRecords } from "../support/open-data";

function rowsOf(values: Float64Array, width: number): number[][] {
  return Array.from({ length: values.length / width }, (_, row) =>
    Array.from(values.subarray(row * width, (row + 1) * width)),
  );
}

function expectSameAsPackage(values: Float64Array, width: number, start: Float64Array): void {
  const k = start.length / width;
  const ours = runLloydIterations(values, width, start);
  const theirs = kmeans(rowsOf(values, width), k, { initialization: rowsOf(start, width) });
  expect(Array.from(ours.centres)).toEqual(theirs.centroids.flat());
  expect(ours.iterations).toBe(theirs.iterations);
  expect(ours.converged).toBe(theirs.converged);
}

describe("Lloyd iterations", () => {
  // Open data: the penguins of the vega-datasets npm package (BSD-3-Clause; Gorman, Williams &
  // Fraser 2014), the four body measurements of the complete rows, standardized.
  it("give ml-kmeans's centres on the penguins' measurements", () => {
    const columns = ["Beak Length (mm)", "Beak Depth (mm)", "Flipper Length (mm)", "Body Mass (g)"];
    const records = loadPenguinsRecords().filter((record) =>
      columns.every((column) => typeof record[column] === "number"),
    );
    const width = columns.length;
    const values = new Float64Array(records.length * width);
    columns.forEach((column, j) => {
      const measured = records.map((record) => record[column] as number);
      const mean = measured.reduce((a, b) => a + b, 0) / measured.length;
      const deviation = Math.sqrt(
        measured.reduce((a, b) => a + (b - mean) ** 2, 0) / measured.length,
      );
      measured.forEach((value, row) => (values[row * width + j] = (value - mean) / deviation));
    });
    for (const k of [3, 12, 40]) {
      expectSameAsPackage(values, width, seedCentres(values, width, k, new SeededRandom(k)));
    }
  });

  it("give ml-kmeans's centres on seeded data in 31 dimensions, unconverged after 100 iterations", () => {
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
});
