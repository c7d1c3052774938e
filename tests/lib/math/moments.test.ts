import { describe, expect, it } from "vitest";
import {
  measureColumnMoments,
  measureColumnMomentsInBlocks,
  measureMoments,
  MOMENT_BLOCK_ROWS,
} from "@/lib/math/moments";
import { runPythonJson } from "../analysis/support/run-python";

/** Outside reference: Python's statistics.mean and pstdev, which sum exactly in rationals. */
const STATISTICS_PROGRAM = `import json,sys,statistics
print(json.dumps([[statistics.mean(c),statistics.pstdev(c)] for c in json.load(sys.stdin)]))`;

describe("measureMoments at the edges of the double range", () => {
  it("neither overflows nor loses the spread near 1e308, like Python's exact statistics module", () => {
    const columns = [
      [1.7e308, -1.6e308, 1.5e308, 1.2e308],
      [1e-310, 3e-310, -2e-310, 5e-311],
      [1e6 + 0.5, 1e6 - 0.25, 1e6 + 0.125, 1e6],
    ];
    const reference = runPythonJson<[number, number][]>(STATISTICS_PROGRAM, columns);
    columns.forEach((column, index) => {
      const moments = measureMoments(Float64Array.from(column));
      const [mean, std] = reference[index];
      expect(Math.abs(moments.mean / mean - 1)).toBeLessThan(1e-14);
      expect(Math.abs(moments.std / std - 1)).toBeLessThan(1e-14);
    });
  });

  it("gives 0 and 0 for a column of zeros and NaN for no rows (no mean exists)", () => {
    expect(measureColumnMoments(Float64Array.of(0, 1, 0, 2), 2, 2, [0, 1])).toEqual([
      { mean: 0, std: 0 },
      { mean: 1.5, std: 0.5 },
    ]);
    expect(measureColumnMoments(new Float64Array(0), 0, 2, [0, 1])).toEqual([
      { mean: Number.NaN, std: Number.NaN },
      { mean: Number.NaN, std: Number.NaN },
    ]);
  });

  it("gives the same bits block by block as for the whole table, and the statistics module's values", () => {
    const rows = 2 * MOMENT_BLOCK_ROWS + 300;
    const stride = 3;
    const table = Float64Array.from(
      { length: rows * stride },
      (_, k) => Math.sin(k * 0.37) * (1 + (k % stride) * 1000) + (k % stride === 2 ? 5e4 : 0),
    );
    const columns = [2, 0];
    const whole = measureColumnMoments(table, rows, stride, columns);
    const visited: number[] = [];
    const blocked = measureColumnMomentsInBlocks(
      (visit) => {
        // Blocks of one and of two MOMENT_BLOCK_ROWS, then the rest, each in a reused buffer.
        const buffer = new Float64Array(2 * MOMENT_BLOCK_ROWS * stride);
        for (const [start, end] of [
          [0, MOMENT_BLOCK_ROWS],
          [MOMENT_BLOCK_ROWS, rows],
        ]) {
          const count = end - start;
          buffer.set(table.subarray(start * stride, end * stride));
          visited.push(count);
          visit(buffer.subarray(0, count * stride), count);
          buffer.fill(Number.NaN);
        }
      },
      rows,
      stride,
      columns,
    );
    expect(blocked).toEqual(whole);
    // Three passes (scales, means, deviations), two blocks each.
    expect(visited).toHaveLength(6);
    const reference = runPythonJson<[number, number][]>(
      STATISTICS_PROGRAM,
      columns.map((column) =>
        Array.from({ length: rows }, (_, row) => table[row * stride + column]),
      ),
    );
    whole.forEach((moments, index) => {
      const [mean, std] = reference[index];
      expect(Math.abs(moments.mean - mean)).toBeLessThanOrEqual(1e-14 * Math.abs(mean) + 1e-16);
      expect(Math.abs(moments.std / std - 1)).toBeLessThan(1e-13);
    });
  });
});
