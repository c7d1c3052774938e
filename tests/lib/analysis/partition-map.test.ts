import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import { readPartitionMap } from "@/lib/analysis/partition-map";
import { loadPenguinsCsv } from "./support/open-data";
import { runPythonJson } from "./support/run-python";

const read = (text: string, byRowIndex = false) =>
  readPartitionMap(Readable.from([text]), "map.csv", { byRowIndex });

describe("reading a partition map (methods.md §1)", () => {
  it("maps the penguins' rows to their islands as Python's csv module reads the same map", async () => {
    // Open data: the vega-datasets penguins with a row_id,shard map by island.
    const { islandMap } = loadPenguinsCsv();
    const map = await read(islandMap, true);
    // Outside reference: CPython's csv module reads the map; shards in first-appearance order, as
    // the map lists them.
    const reference = runPythonJson<{ shards: string[]; codes: number[] }>(
      `import sys, io, csv, json
rows = list(csv.DictReader(io.StringIO(json.load(sys.stdin))))
shards = list(dict.fromkeys(row["shard"].strip() for row in rows))
print(json.dumps({"shards": shards, "codes": [shards.index(row["shard"].strip()) for row in rows]}))`,
      islandMap,
    );
    expect(map.shardIds).toEqual(reference.shards);
    expect(map.fileName).toBe("map.csv");
    expect(reference.codes.map((_, row) => map.lookUp(String(row)))).toEqual(reference.codes);
    expect(map.findUnmatched()).toEqual([]);
  });

  it("trims ids, finds the columns in any case and order, and matches each row id once", async () => {
    const map = await read("Shard,ROW_ID\n north ,a\nsouth, b \nnorth,c\n");
    expect(map.shardIds).toEqual(["north", "south"]);
    expect(map.lookUp("b")).toBe(1);
    expect(map.lookUp("a")).toBe(0);
    expect(map.lookUp("zz")).toBe(-1);
    // The dataset repeats an id: the second match is told apart.
    expect(map.lookUp("a")).toBe(-2);
    expect(map.findUnmatched()).toEqual(["c"]);
    expect(map.lookUp("c")).toBe(0);
    expect(map.findUnmatched()).toEqual([]);
  });

  it("takes 0-based row indices in canonical form without an id column, so 007 is row 7", async () => {
    const map = await read("row_id,shard\n007,a\n+1,b\n0,a\n", true);
    expect(map.lookUp("7")).toBe(0);
    expect(map.lookUp("1")).toBe(1);
    expect(map.lookUp("007")).toBe(-1);
    expect(map.findUnmatched()).toEqual(["0"]);
    await expect(read("row_id,shard\n1.5,a\n", true)).rejects.toThrow(
      'map.csv, data row 0 (0-based, header excluded; line 2), column "row_id": the row id "1.5" is not a row index (expected a 0-based data row index (the dataset has no id column))',
    );
    await expect(read("row_id,shard\n0,a\n-1,a\n", true)).rejects.toThrow(
      'data row 1 (0-based, header excluded; line 3), column "row_id": the row id "-1" is not a row index',
    );
    // With an id column the same tokens are plain ids.
    const byId = await read("row_id,shard\n007,a\n1.5,b\n");
    expect(byId.lookUp("007")).toBe(0);
    expect(byId.lookUp("7")).toBe(-1);
    expect(byId.lookUp("1.5")).toBe(1);
  });

  it("names the first offenders: duplicates, missing ids, empty shards, a wrong header", async () => {
    const duplicated = [
      "row_id,shard",
      ...[1, 2, 1, 3, 2, 4, 5, 6, 7, 8, 9, 4, 5, 6, 7, 8, 9, 9].map((id) => `${id},s`),
    ];
    await expect(read(duplicated.join("\n"))).rejects.toThrow(
      'map.csv, column "row_id": 9 row ids are listed more than once: "1", "2", "4", "5", "6", … (9 in all) (expected every row assigned exactly once)',
    );
    await expect(read("row_id,shard\n1,a\n,b\n")).rejects.toThrow(
      'map.csv, data row 1 (0-based, header excluded; line 3), column "row_id": the row id is missing (expected a value of the dataset\'s id column)',
    );
    await expect(read("row_id,shard\n NA ,b\n", true)).rejects.toThrow(
      "the row id is missing (expected a 0-based data row index)",
    );
    await expect(read("row_id,shard\n1,a\n2, \n")).rejects.toThrow(
      'map.csv, data row 1 (0-based, header excluded; line 3), column "shard": the shard is empty (expected a shard id)',
    );
    // "NA" is a shard id like any other: only an empty one is refused.
    expect((await read("row_id,shard\n1,NA\n")).shardIds).toEqual(["NA"]);
    await expect(read("id,shard\n1,a\n")).rejects.toThrow(
      'map.csv: the header is "id,shard" (expected a header row_id,shard)',
    );
    await expect(read("row_id,part\n1,a\n")).rejects.toThrow('the header is "row_id,part"');
  });
});
