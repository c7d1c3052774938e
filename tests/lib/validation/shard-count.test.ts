// The participants hint of the analysis form reads the layout's shard count from its preview.
// Source: the penguins data's documentation (vega-datasets, BSD-3) — three islands.
import { describe, expect, it } from "vitest";
import { PREVIEW_BYTES } from "@/lib/uploads/csv-preview";
import { inspectDataset, inspectLayout } from "@/lib/uploads/inspect-upload";
import { describeTooFewShards, previewedShards } from "@/lib/validation/shard-count";
import { loadPenguinsCsv } from "@/tests/lib/analysis/support/open-data";

const source = (text: string, fileName: string) => {
  const bytes = new TextEncoder().encode(text);
  return { bytes: bytes.subarray(0, PREVIEW_BYTES), totalBytes: bytes.length, fileName };
};

describe("the shards a layout's preview shows", () => {
  const { csv, islandMap } = loadPenguinsCsv();

  it("counts the three islands of a whole partition map, its shard column found in any case", () => {
    const map = inspectLayout(source(islandMap.replace("shard", "Shard"), "islands.csv"));
    expect(previewedShards(map, "shard", "islands.csv")).toEqual({
      count: 3,
      complete: true,
      where: 'column "Shard" of "islands.csv"',
    });
    expect(describeTooFewShards(4, 3, 'column "Shard" of "islands.csv"')).toBe(
      'Shards per round (M) is 4, but column "Shard" of "islands.csv" names 3 shards: choose at most 3, or let every shard take part.',
    );
  });

  it("marks a count from the first bytes of a longer file as incomplete", () => {
    const preview = inspectDataset(source(csv, "penguins.csv"));
    const cut = { ...preview, truncated: true };
    expect(previewedShards(cut, "Island", "penguins.csv")).toMatchObject({
      count: 3,
      complete: false,
    });
    expect(previewedShards(preview, "Nowhere", "penguins.csv")).toBeUndefined();
    expect(previewedShards(null, "Island", "penguins.csv")).toBeUndefined();
  });
});
