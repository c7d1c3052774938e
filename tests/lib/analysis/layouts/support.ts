import type { LayoutRows } from "@/lib/analysis/layouts/layout-rows";
import { SeededRandom } from "@/lib/math/random";
import { loadPenguinsRecords } from "../support/open-data";

/**
 * Seeded synthetic rows for the generators: `classCount` classes with unequal pooled shares
 * (proportional to 1, 2, …, C), `width` standardized-looking features around a per-class centre,
 * the bias last, and `groupCount` groups whose label mixes differ (group g favours class g mod C).
 */
export function makeRows({
  rows,
  classCount,
  width = 3,
  groupCount = 0,
  seed = 11,
}: {
  rows: number;
  classCount: number;
  width?: number;
  groupCount?: number;
  seed?: number;
}): LayoutRows {
  const random = new SeededRandom(seed);
  const cols = width + 1;
  const classes = new Int32Array(rows);
  const data = new Float64Array(rows * cols);
  const groups = groupCount > 0 ? new Int32Array(rows) : null;
  const weights = Array.from({ length: classCount }, (_, c) => c + 1);
  const totalWeight = weights.reduce((a, b) => a + b, 0);
  for (let row = 0; row < rows; row++) {
    const group = groupCount > 0 ? random.integer(groupCount) : 0;
    let c: number;
    if (groups && random.uniform() < 0.6) {
      c = group % classCount;
    } else {
      let target = random.uniform() * totalWeight;
      c = 0;
      while ((target -= weights[c]) >= 0) c++;
    }
    classes[row] = c;
    if (groups) groups[row] = group;
    for (let j = 0; j < width; j++) data[row * cols + j] = c + random.normal() * 0.5;
    data[row * cols + width] = 1;
  }
  return {
    classes,
    classCount,
    features: { rows, cols, data },
    groups,
    groupIds: Array.from({ length: groupCount }, (_, g) => `group-${g}`),
  };
}

/** Per shard, rows per class (M × C). */
export function countByShard(
  rows: LayoutRows,
  assignment: Int32Array,
  shardCount: number,
): number[][] {
  const counts = Array.from({ length: shardCount }, () =>
    new Array<number>(rows.classCount).fill(0),
  );
  rows.classes.forEach((c, row) => counts[assignment[row]][c]++);
  return counts;
}

/** Shards each group's rows landed in (a group kept whole has exactly one). */
export function shardsPerGroup(rows: LayoutRows, assignment: Int32Array): Set<number>[] {
  const seen = rows.groupIds.map(() => new Set<number>());
  (rows.groups as Int32Array).forEach((g, row) => seen[g].add(assignment[row]));
  return seen;
}

/**
 * Open data: the penguins of the vega-datasets npm package (BSD-3-Clause; Gorman, Williams &
 * Fraser 2014), the four body measurements of the complete rows, each standardized (population
 * deviation), row-major with 4 numbers a row.
 */
export function standardizedPenguinMeasurements(): { values: Float64Array; width: number } {
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
  return { values, width };
}
