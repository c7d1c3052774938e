import { availableParallelism } from "node:os";
import { describe, expect, it } from "vitest";
import {
  countThreadsForBytes,
  countThreadsForDesign,
  countThreadsForWork,
} from "@/lib/analysis/choose-threads";
import type { Design } from "@/lib/analysis/design";

/** Node's count of the cores this process may use, capped at the pool's default of 8 threads. */
const MACHINE_THREADS = Math.min(8, availableParallelism());

/** A design of `rows` × `cols` with `classes` (null: regression); passes read only its shape. */
function designOfShape(rows: number, cols: number, classes: string[] | null): Design {
  return {
    x: { rows, cols, data: new Float64Array(0) },
    task: classes === null ? "regression" : "classification",
    classes,
    labels: null,
    targets: null,
    skewCategories: new Int32Array(0),
    skewCategoryCount: 0,
    shardIds: [],
    shardOffsets: new Int32Array(1),
    featureNames: [],
    omittedColumns: [],
    droppedRowsMissingLabel: 0,
    droppedRowsUnassigned: 0,
    badNumbersCountedMissing: [],
    warnings: [],
  };
}

describe("how many threads share an analysis's passes by default", () => {
  it("needs a machine with more than one core to tell the two answers apart", () => {
    expect(MACHINE_THREADS).toBeGreaterThan(1);
  });

  it("uses every core for a data file from 16 MiB on, one thread below", () => {
    expect(countThreadsForBytes(16 * 2 ** 20 - 1)).toBe(1);
    expect(countThreadsForBytes(16 * 2 ** 20)).toBe(MACHINE_THREADS);
    expect(countThreadsForBytes(0)).toBe(1);
  });

  it("uses every core for passes of 2²⁶ rows × width × weight rows or more, one thread below", () => {
    expect(countThreadsForWork(2 ** 26 - 1)).toBe(1);
    expect(countThreadsForWork(2 ** 26)).toBe(MACHINE_THREADS);
    // A design's work counts one weight row per class, one for least squares.
    expect(countThreadsForDesign(designOfShape(2 ** 20, 32, ["a", "b"]))).toBe(MACHINE_THREADS);
    expect(countThreadsForDesign(designOfShape(2 ** 20, 32, null))).toBe(1);
    expect(countThreadsForDesign(designOfShape(2 ** 20, 64, null))).toBe(MACHINE_THREADS);
    expect(countThreadsForDesign(designOfShape(2 ** 19, 64, ["a", "b"]))).toBe(MACHINE_THREADS);
    expect(countThreadsForDesign(designOfShape(2 ** 19, 63, ["a", "b"]))).toBe(1);
  });
});
