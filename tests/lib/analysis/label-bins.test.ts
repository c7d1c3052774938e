import { describe, expect, it } from "vitest";
import { analyzeText } from "./support/analyze-text";

describe("regression's label bins, with the label values each holds (methods.md §4)", () => {
  it("gives each decile bin's smallest and largest label in the label's own units", async () => {
    // Labels 1…20 (shuffled across two shards), with a feature that varies. By hand, NumPy's linear
    // interpolation puts the cut points at q_k = 1 + 19k/10 = 2.9, 4.8, …, 18.1, so row y falls in
    // bin #{k : y > q_k}: {1, 2}, {3, 4}, …, {19, 20}.
    const rows = Array.from({ length: 20 }, (_, i) => {
      const label = ((i * 7) % 20) + 1;
      return `${label},${(label * 37) % 11},${i % 2 === 0 ? "north" : "south"}`;
    });
    const summary = await analyzeText(["y,x,part", ...rows].join("\n"), {
      labelColumn: "y",
      shardColumn: "part",
      task: "regression",
    });
    expect(summary.labelSkew.categories).toHaveLength(10);
    expect(summary.labelSkew.binRanges).toEqual(
      Array.from({ length: 10 }, (_, bin) => [2 * bin + 1, 2 * bin + 2]),
    );
  });

  it("gives none for classification, whose categories are the classes themselves", async () => {
    const rows = ["y,x,part", "a,1,n", "b,2,n", "a,3,s", "b,4,s", "a,5,n", "b,6,s"];
    const summary = await analyzeText(rows.join("\n"), { labelColumn: "y", shardColumn: "part" });
    expect(summary.labelSkew.binRanges).toBeUndefined();
  });
});
