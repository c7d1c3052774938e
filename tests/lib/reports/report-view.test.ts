import { describe, expect, it } from "vitest";
import type { PartitionSummary, ShardSummary } from "@/lib/analysis/summary";
import {
  buildLabelMix,
  computeBarrierThreshold,
  formatDecade,
  formatFigure,
  rankShardsByDivergence,
  selectDivergenceCandidates,
  spanDecades,
} from "@/lib/reports/report-view";

function shard(id: string, labelCounts: number[], tv: number): ShardSummary {
  const rows = labelCounts.reduce((sum, count) => sum + count, 0);
  return {
    id,
    rows,
    tv,
    hellinger: 0,
    js: tv / 2,
    kl: 0,
    gradNorm2: 0,
    sigma2: 0,
    loss: 0,
    classesPresent: labelCounts.filter((count) => count > 0).length,
    effectiveClasses: 1,
    featureShift: 0,
    labelCounts,
  };
}

function summaryWith(shards: ShardSummary[]): PartitionSummary {
  const totals = [0, 1].map((c) => shards.reduce((sum, s) => sum + s.labelCounts[c], 0));
  const rows = totals[0] + totals[1];
  return {
    dataset: { rows },
    shards,
    labelSkew: { categories: ["no", "yes"], pooled: totals.map((total) => total / rows) },
    heterogeneity: { smoothness: 2 },
    model: { distance: 3 },
    advice: { rounds: 4 },
  } as unknown as PartitionSummary; // only the fields these functions read
}

describe("formatFigure", () => {
  it.each([
    [0.123456, "0.123"],
    [1234.5, "1,230"],
    [0, "0"],
    [0.000123, "1.23×10⁻⁴"],
    [12_345_678, "1.23×10⁷"],
    [null, "—"],
    [Number.NaN, "—"],
  ])("shows %s as %s", (value, expected) => {
    expect(formatFigure(value)).toBe(expected);
  });
});

describe("buildLabelMix", () => {
  const shards = [
    shard("a", [3, 1], 0.1),
    shard("b", [0, 4], 0.6),
    shard("c", [2, 2], 0.2),
    shard("All shards", [1, 1], 0.3),
  ];

  it("puts the pooled mix first and every shard in stored order when they fit", () => {
    const mix = buildLabelMix(summaryWith(shards), 10, shards.length);
    expect(mix.capped).toBe(false);
    expect(mix.bars.map((bar) => bar.name)).toEqual(["All shards", "a", "b", "c", "All shards"]);
    // A shard named like the pooled bar still gets a key of its own.
    expect(new Set(mix.bars.map((bar) => bar.key)).size).toBe(5);
    expect(mix.bars[1]).toMatchObject({ c0: 0.75, c1: 0.25, rows: 4 });
    expect(mix.bars[0]).toMatchObject({ c0: 6 / 14, c1: 8 / 14 });
  });

  it("keeps only the most divergent shards, most divergent first, above the cap", () => {
    const mix = buildLabelMix(summaryWith(shards), 2, shards.length);
    expect(mix).toMatchObject({ capped: true, shownShards: 2, totalShards: 4 });
    expect(mix.bars.map((bar) => bar.name)).toEqual(["All shards", "b", "All shards"]);
  });
});

describe("rankShardsByDivergence", () => {
  it("orders by the chosen measure and keeps stored order on ties", () => {
    const ranked = rankShardsByDivergence(
      [shard("x", [1, 0], 0.2), shard("y", [1, 0], 0.5), shard("z", [1, 0], 0.2)],
      "js",
    );
    expect(ranked.map((s) => s.id)).toEqual(["y", "x", "z"]);
  });
});

describe("computeBarrierThreshold", () => {
  // methods.md §5: the barrier is ζ*² ≥ H²B²/R; H = 2, B = 3, R = 4 gives 4·9/4 = 9.
  it("is H²B²/R", () => {
    expect(computeBarrierThreshold(summaryWith([shard("a", [1, 1], 0)]))).toBe(9);
  });
});

describe("spanDecades and formatDecade", () => {
  it("covers every positive value with whole decades", () => {
    expect(spanDecades([0.0014, 0.64, 0.95])).toEqual([0.001, 0.01, 0.1, 1]);
    expect(spanDecades([5])).toEqual([1, 10]);
    expect(spanDecades([0, Number.NaN])).toEqual([1]);
  });

  it("writes powers of ten as 10ⁿ", () => {
    expect([1e-4, 0.1, 1, 10, 1000].map(formatDecade)).toEqual(["10⁻⁴", "0.1", "1", "10", "10³"]);
  });
});

describe("selectDivergenceCandidates", () => {
  it("sends every shard under the cap and, above it, the cap largest by each measure", () => {
    // TV rises with the index while JS (set below) falls, so the two top-2 sets are disjoint.
    const shards = [0.1, 0.2, 0.3, 0.4, 0.5].map((tv, index) => ({
      ...shard(`s${index}`, [1, 1], tv),
      js: 0.5 - tv,
    }));
    expect(selectDivergenceCandidates(shards, 5).map((bar) => bar.name)).toHaveLength(5);
    expect(selectDivergenceCandidates(shards, 2)).toEqual([
      { name: "s0", tv: 0.1, js: 0.4 },
      { name: "s1", tv: 0.2, js: 0.3 },
      { name: "s3", tv: 0.4, js: 0.09999999999999998 },
      { name: "s4", tv: 0.5, js: 0 },
    ]);
  });
});
