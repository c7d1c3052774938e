import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import { AnalysisInputError, countShardsUpTo } from "@/lib/analysis";
import { loadPenguinsCsv } from "./support/open-data";

const PENGUINS = loadPenguinsCsv();
const count = (text: string, column: string, enough: number) =>
  countShardsUpTo(Readable.from([text]), "file.csv", column, enough);

describe("counting a file's shards before a run", () => {
  it("counts the penguins' islands in the dataset's column and in the partition map", async () => {
    // Open data: the vega-datasets penguins come from three islands (Biscoe, Dream, Torgersen).
    expect(await count(PENGUINS.csv, "Island", 10)).toEqual({ count: 3, complete: true });
    // The map's column is found as the engine finds it, whatever its case.
    expect(await count(PENGUINS.islandMap, "SHARD", 10)).toEqual({ count: 3, complete: true });
  });

  it("stops once enough shards are seen, and skips missing values and blanks around names", async () => {
    expect(await count(PENGUINS.csv, "Island", 2)).toEqual({ count: 2, complete: false });
    const text = "x,part\n1, north\n2,NA\n3,north \n4,\n5,south\n";
    expect(await count(text, "part", 5)).toEqual({ count: 2, complete: true });
  });

  it("names the column a file lacks", async () => {
    await expect(count("x,y\n1,2\n", "part", 2)).rejects.toThrow(
      new AnalysisInputError('there is no column "part"', {
        file: "file.csv",
        expected: 'a column named "part"',
      }),
    );
  });
});
