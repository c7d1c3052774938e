// The column and assignment rules of methods.md §1, each checked against the rule as stated there:
// features default to all but the label, id and shard columns; every kept row is assigned exactly
// once, and unknown ids, duplicate ids and unassigned rows are errors naming counts and the first
// few offenders; a file must keep at least one labelled row.
import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import { LISTED_OFFENDERS, locateColumns } from "@/lib/analysis/dataset-rows";
import { readPartitionMap } from "@/lib/analysis/partition-map";
import { readDataset, type DatasetColumnChoice } from "@/lib/analysis/read-dataset";

const HEADER = ["id", "a", "label", "b", "shard", "c"];

async function read(
  csv: string,
  columns: DatasetColumnChoice,
  map: string | null,
  dropUnassignedRows = false,
) {
  const partition =
    map === null
      ? null
      : await readPartitionMap(Readable.from([map]), "map.csv", {
          byRowIndex: columns.idColumn === undefined,
        });
  return readDataset(Readable.from([csv]), "data.csv", columns, {
    partition,
    dropUnassignedRows,
  });
}

describe("columns (methods.md §1)", () => {
  it("takes all but the label, id and shard columns as features by default", () => {
    const columns = { labelColumn: "label", idColumn: "id", shardColumn: "shard" };
    expect(locateColumns(HEADER, "data.csv", columns)).toEqual({
      label: 2,
      id: 0,
      shard: 4,
      features: [1, 3, 5],
    });
    expect(locateColumns(HEADER, "data.csv", { labelColumn: "label" })).toEqual({
      label: 2,
      id: -1,
      shard: -1,
      features: [0, 1, 3, 4, 5],
    });
    expect(
      locateColumns(HEADER, "data.csv", { labelColumn: "label", features: ["c", "a"] }).features,
    ).toEqual([5, 1]);
  });

  it("names a missing column by its role, and refuses a feature that has another role", () => {
    expect(() => locateColumns(HEADER, "data.csv", { labelColumn: "y" })).toThrow(
      'data.csv, column "y": there is no label column "y" (expected one of the header\'s columns: "id", "a", "label", "b", "shard", "c")',
    );
    expect(() =>
      locateColumns(HEADER, "data.csv", { labelColumn: "label", idColumn: "key" }),
    ).toThrow(/there is no id column "key"/);
    expect(() =>
      locateColumns(HEADER, "data.csv", { labelColumn: "label", shardColumn: "site" }),
    ).toThrow(/there is no shard column "site"/);
    expect(() =>
      locateColumns(HEADER, "data.csv", { labelColumn: "label", features: ["d"] }),
    ).toThrow(/there is no feature column "d"/);
    for (const features of [["label"], ["a", "id"], ["shard"]]) {
      expect(() =>
        locateColumns(HEADER, "data.csv", {
          labelColumn: "label",
          idColumn: "id",
          shardColumn: "shard",
          features,
        }),
      ).toThrow(
        `data.csv, column "${features.at(-1)}": a feature cannot also be the label, id or shard column (expected features other than the label, id and shard columns)`,
      );
    }
  });
});

describe("assignment (methods.md §1)", () => {
  it("names the count and the first offenders of unassigned rows and of unknown ids", async () => {
    const rows = Array.from({ length: 9 }, (_, i) => `${i},${i % 3}`);
    const csv = `x,label\n${rows.join("\n")}\n`;
    // Rows 0–6 have no shard; the map names two rows the file does not have.
    const map = "row_id,shard\n7,s\n8,s\n20,s\n31,s\n";
    expect(LISTED_OFFENDERS).toBe(5);
    await expect(read(csv, { labelColumn: "label" }, map)).rejects.toThrow(
      'map.csv, column "row_id": 7 data rows with a label have no shard (rows 0, 1, 2, 3, 4, … (7 in all)); 2 row ids in the partition map match no data row ("20", "31") (expected every labelled data row assigned to exactly one shard)',
    );
    // Dropping unassigned rows leaves the unknown ids an error of their own.
    await expect(read(csv, { labelColumn: "label" }, map, true)).rejects.toThrow(
      /^map\.csv, column "row_id": 2 row ids in the partition map match no data row/,
    );
    const fitting = "row_id,shard\n7,s\n8,t\n";
    const dropped = await read(csv, { labelColumn: "label" }, fitting, true);
    expect([dropped.keptRows, dropped.droppedUnassigned]).toEqual([2, 7]);
    expect(dropped.shardIds).toEqual(["s", "t"]);
  });

  it("names a shard column's unassigned rows, and a repeated id with its row", async () => {
    const csv = "x,label,shard\n1,a,s\n2,b,\n3,a,NA\n4,b,s\n";
    await expect(read(csv, { labelColumn: "label", shardColumn: "shard" }, null)).rejects.toThrow(
      'data.csv, column "shard": 2 data rows with a label have no shard (rows 1, 2) (expected every labelled data row assigned to exactly one shard)',
    );
    await expect(
      read(
        "id,label\nq,a\n r ,b\nr,a\n",
        { labelColumn: "label", idColumn: "id" },
        "row_id,shard\nq,s\nr,s\n",
      ),
    ).rejects.toThrow(
      'data.csv, data row 2 (0-based, header excluded; line 4), column "id": the id "r" appears on more than one data row (expected unique ids, so each row is assigned exactly once)',
    );
  });

  it("needs one labelled row, and says whether the file had none at all", async () => {
    const columns = { labelColumn: "label", shardColumn: "shard" };
    await expect(read("x,label,shard\n", columns, null)).rejects.toThrow(
      'data.csv, column "label": the file has a header but no data rows (expected at least one row with a label)',
    );
    await expect(read("x,label,shard\n1,,s\n2,NA,s\n", columns, null)).rejects.toThrow(
      'data.csv, column "label": every data row lacks a label (expected at least one row with a label)',
    );
  });
});
