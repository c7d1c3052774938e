import { TARGET_HISTOGRAM_CELLS } from "./digest-format";

/**
 * Regression's decile bins (methods.md §4) from per-shard histograms of the standardized target on
 * 4096 equal cells (methods.md §9): the k/10 quantile's position (k/10)·(N − 1) among the sorted
 * rows (NumPy's linear rule) falls in some cell c_k; a row in cell j goes to bin #{k : j > c_k},
 * so the rows of a cell that holds a cut point stay below it; empty bins are dropped and the rest
 * renumbered. Exact when no cell holds a cut point and rows on both sides of it.
 *
 * Example: 10 rows, one in each of the cells 0…9, give 10 bins of one row each.
 */
export function binHistogramIntoDeciles(histograms: [number, number][][]): {
  binOfCell: Int32Array;
  binCount: number;
} {
  const pooled = new Float64Array(TARGET_HISTOGRAM_CELLS);
  for (const histogram of histograms) for (const [cell, count] of histogram) pooled[cell] += count;
  const total = pooled.reduce((a, b) => a + b, 0);
  const cutCells = Array.from({ length: 9 }, (_, k) => {
    const position = Math.floor(((k + 1) / 10) * (total - 1));
    // The counts add up to total > position, so the walk ends inside the cells.
    let cell = 0;
    let seen = pooled[0];
    while (seen <= position) seen += pooled[++cell];
    return cell;
  });
  const rawBin = new Int32Array(TARGET_HISTOGRAM_CELLS);
  const used = new Uint8Array(10);
  for (let cell = 0; cell < TARGET_HISTOGRAM_CELLS; cell++) {
    let bin = 0;
    for (const cut of cutCells) if (cell > cut) bin++;
    rawBin[cell] = bin;
    if (pooled[cell] > 0) used[bin] = 1;
  }
  const renumber = new Int32Array(10);
  let binCount = 0;
  for (let bin = 0; bin < 10; bin++) if (used[bin]) renumber[bin] = binCount++;
  return { binOfCell: rawBin.map((bin) => renumber[bin]), binCount };
}
