import { describe, expect, it } from "vitest";
import { TARGET_HISTOGRAM_CELLS } from "@/lib/analysis/digests";
import { binHistogramIntoDeciles } from "@/lib/analysis/digests/histogram-deciles";
import { runPythonJson } from "../support/run-python";

/**
 * Outside reference: NumPy's quantiles (`np.quantile`, its default linear rule) of the rows' cell
 * numbers. A row in cell j belongs to bin #{k : j > q_k} (np.searchsorted, side "left"), bins that
 * hold no row dropped and the rest renumbered (np.unique's inverse). For cells that hold rows this
 * is methods.md §9's decile rule exactly: q_k lies between the cell c_k of the row at position
 * ⌊(k/10)(N − 1)⌋ and the next occupied cell, so j > q_k ⇔ j > c_k. Each case is a list of shards,
 * each shard its rows' cell numbers, drawn by NumPy's default_rng.
 */
const REFERENCE = `import json
import numpy as np
rng = np.random.default_rng(20261205)
cases = [
    [list(range(10))],
    [[0] * 7 + [3] * 2, [3] * 4 + [9] * 3],
    [[5] * 30],
    [[0, 4095] * 6, [4095] * 5],
    [[4095] * 3 + [17] * 20],
]
for n, shards in [(13, 2), (25, 3), (101, 4), (997, 7)]:
    cells = rng.integers(0, 12, n) * 300 + rng.integers(0, 2, n)
    cuts = np.sort(rng.integers(0, n, shards - 1))
    cases.append([part.tolist() for part in np.split(cells, cuts)])
for n in [40, 3000]:
    cells = np.clip(np.floor((rng.standard_normal(n) / 8 + 0.5) * 4096), 0, 4095).astype(int)
    cases.append([cells[: n // 3].tolist(), cells[n // 3 :].tolist()])
out = []
for shards in cases:
    rows = np.concatenate([np.array(shard, dtype=float) for shard in shards])
    q = np.quantile(rows, np.arange(1, 10) / 10)
    raw = np.searchsorted(q, rows, side="left")
    used, bins = np.unique(raw, return_inverse=True)
    out.append({"shards": shards, "bins": bins.tolist(), "binCount": int(len(used))})
print(json.dumps(out))`;

/** Per shard, [cell, rows] of its non-empty cells, as a client sends them (gradient-digest.ts). */
function histogramOf(cells: number[]): [number, number][] {
  const counts = new Map<number, number>();
  for (const cell of cells) counts.set(cell, (counts.get(cell) ?? 0) + 1);
  return [...counts.entries()].sort((a, b) => a[0] - b[0]);
}

describe("decile bins from the pooled target histogram (methods.md §4, §9)", () => {
  it("puts every row in NumPy's decile bin, drops empty bins and renumbers the rest", () => {
    const cases =
      runPythonJson<{ shards: number[][]; bins: number[]; binCount: number }[]>(REFERENCE);
    expect(cases.length).toBe(11);
    for (const { shards, bins, binCount } of cases) {
      const result = binHistogramIntoDeciles(shards.map(histogramOf));
      expect(result.binOfCell).toHaveLength(TARGET_HISTOGRAM_CELLS);
      expect(result.binCount, JSON.stringify(shards).slice(0, 80)).toBe(binCount);
      expect(shards.flat().map((cell) => result.binOfCell[cell])).toEqual(bins);
    }
  });

  it("gives the docstring's example: one row in each of the cells 0…9 makes 10 bins of one row", () => {
    const result = binHistogramIntoDeciles([[0, 1, 2, 3, 4, 5, 6, 7, 8, 9].map((c) => [c, 1])]);
    expect(result.binCount).toBe(10);
    expect(Array.from(result.binOfCell.slice(0, 10))).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8, 9]);
  });
});
