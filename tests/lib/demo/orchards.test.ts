import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import { analyzePartition } from "@/lib/analysis";
import { DEMO_PLAN, generateOrchardDemo } from "@/lib/demo/orchards";

// The demo is invented data; these checks are about the product's promise for the demo (two
// layouts whose verdicts disagree), not about the correctness of any number.
describe("the orchard demo", () => {
  const files = generateOrchardDemo();

  it("is the same bytes on every run", () => {
    expect(generateOrchardDemo()).toEqual(files);
  });

  it("assigns every row once in both layouts, to 24 shards", () => {
    const rowIds = files.dataset
      .trim()
      .split("\n")
      .slice(1)
      .map((line) => line.split(",")[0]);
    for (const layout of [files.byOrchard, files.shuffled]) {
      const lines = layout.trim().split("\n").slice(1);
      expect(lines.map((line) => line.split(",")[0])).toEqual(rowIds);
      expect(new Set(lines.map((line) => line.split(",")[1])).size).toBe(24);
    }
  });

  it("gives the two layouts different verdicts under the demo plan", async () => {
    const verdictFor = async (layout: string) => {
      const summary = await analyzePartition({
        data: Readable.from([files.dataset]),
        partition: Readable.from([layout]),
        options: { labelColumn: "condition", idColumn: "row_id", ...DEMO_PLAN },
      });
      return summary.advice.verdict;
    };
    expect(await verdictFor(files.byOrchard)).toBe("large-minibatch");
    expect(await verdictFor(files.shuffled)).toBe("local-updates");
  });
});
