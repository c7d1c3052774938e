import { tmpdir } from "node:os";
import { describe, expect, it } from "vitest";
import {
  measureFeatureShift,
  measureFeatureShiftFromSums,
  sumFeaturesPerShard,
} from "@/lib/analysis/measure-feature-shift";
import { ScratchFile } from "@/lib/analysis/scratch-file";
import { runPythonJson } from "./support/run-python";

const ROWS = 13;
const WIDTH = 4;
/** Shards of 5, 0 and 8 rows: an empty shard in the middle. */
const OFFSETS = Int32Array.of(0, 5, 5, 13);
const X = Float64Array.from({ length: ROWS * WIDTH }, (_, k) =>
  k % WIDTH === WIDTH - 1 ? 1 : Math.sin(3 * k + 1) * (1 + (k % WIDTH)) + 0.2,
);

describe("feature shift (methods.md §4) against NumPy", () => {
  it("sums each shard's features and gives √((1/d) Σⱼ x̄ₘⱼ²), in memory and from a scratch file", () => {
    // Outside reference: numpy sum and mean over each shard's rows, the bias column left out.
    const reference = runPythonJson<{ sums: number[][]; shift: number[] }>(
      `import json,sys
import numpy as np
d=json.load(sys.stdin); X=np.array(d["x"]).reshape(-1,${WIDTH})[:,:-1]; off=d["offsets"]
sums=[X[off[m]:off[m+1]].sum(0) for m in range(len(off)-1)]
shift=[float(np.sqrt((X[off[m]:off[m+1]].mean(0)**2).mean())) if off[m+1]>off[m] else None for m in range(len(off)-1)]
print(json.dumps({"sums":[s.tolist() for s in sums],"shift":shift}))`,
      { x: Array.from(X), offsets: Array.from(OFFSETS) },
    );
    const shardIds = ["a", "b", "c"];
    const inMemory = { x: { rows: ROWS, cols: WIDTH, data: X }, shardIds, shardOffsets: OFFSETS };
    const file = new ScratchFile(tmpdir());
    try {
      file.write(X, 0);
      // Blocks of 3 rows: block ends fall inside shards and at neither shard end.
      const onDisk = {
        x: { rows: ROWS, cols: WIDTH, file, blockRows: 3 },
        shardIds,
        shardOffsets: OFFSETS,
      };
      for (const design of [inMemory, onDisk]) {
        const sums = sumFeaturesPerShard(design);
        expect(sums).toHaveLength(3);
        sums.forEach((shard, m) =>
          shard.forEach((value, j) => expect(value).toBeCloseTo(reference.sums[m][j], 14)),
        );
        const shift = measureFeatureShift(design);
        expect(shift[0]).toBeCloseTo(reference.shift[0] ?? Number.NaN, 14);
        expect(shift[1]).toBeNaN(); // 0/0: a shard without rows has no mean.
        expect(shift[2]).toBeCloseTo(reference.shift[2] ?? Number.NaN, 14);
      }
    } finally {
      file.close();
    }
  });

  it("sums with compensation, in two shards (identity: 1 + 1e16 + 1 − 1e16 = 2)", () => {
    // Left to right in doubles the sums are 0 (1e16 + 1 rounds to 1e16); exactly they are 2 and
    // −2, so each shard's mean is ±½.
    const x = Float64Array.of(1, 1, 1e16, 1, 1, 1, -1e16, 1, -1, 1, -1e16, 1, -1, 1, 1e16, 1);
    const design = {
      x: { rows: 8, cols: 2, data: x },
      shardIds: ["a", "b"],
      shardOffsets: Int32Array.of(0, 4, 8),
    };
    expect(sumFeaturesPerShard(design).map((sums) => Array.from(sums))).toEqual([[2], [-2]]);
    expect(measureFeatureShift(design)).toEqual([0.5, 0.5]);
  });

  it("is 0 without features, and 1 for sums [3, −3] over 3 rows (hand-computed)", () => {
    expect(measureFeatureShiftFromSums([], 10)).toBe(0);
    expect(measureFeatureShiftFromSums([3, -3], 3)).toBe(1);
    expect(measureFeatureShiftFromSums([2, 0, 4], 2)).toBeCloseTo(Math.sqrt(5 / 3), 15);
  });
});
