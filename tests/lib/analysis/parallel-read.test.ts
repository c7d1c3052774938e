// Reading a CSV in parts on several threads must give the dataset a single read gives, value for
// value (the identity the parallel reader promises; the single read is itself checked against
// pandas and scikit-learn elsewhere). The table is the penguins data of the `vega-datasets` npm
// package (BSD-3-Clause) with its island as the shard column, so parts cut across islands, missing
// measurements, the "." sex level and first appearances of levels in later parts are exercised.
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { describe, expect, it } from "vitest";
import { analyzePartition } from "@/lib/analysis";
import { readDataset, type RawDataset } from "@/lib/analysis/read-dataset";
import { loadPenguinsRecords } from "./support/open-data";

const folder = mkdtempSync(path.join(tmpdir(), "partita-parallel-read-"));

/** The penguins as CSV with `shard` = island; `edit` may change the text of each data row. */
function writePenguins(
  name: string,
  edit: (line: string, index: number) => string = (line) => line,
  lineEnd = "\n",
) {
  const records = loadPenguinsRecords();
  const columns = Object.keys(records[0]).filter((column) => column !== "Island");
  const lines = [["shard", ...columns].join(",")];
  records.forEach((record, index) => {
    const fields = [record.Island, ...columns.map((c) => (record[c] === null ? "" : record[c]))];
    lines.push(edit(fields.join(","), index));
  });
  const file = path.join(folder, name);
  writeFileSync(file, `${lines.join(lineEnd)}${lineEnd}`);
  return file;
}

const COLUMNS = { labelColumn: "Species", shardColumn: "shard" };

/** The plain-data view of a read dataset (accumulators as their levels and counts). */
function describe_(raw: RawDataset) {
  const column = (accumulator: RawDataset["label"]) => ({
    name: accumulator.name,
    numeric: accumulator.numeric,
    missing: accumulator.missingCount,
    firstNonNumeric: accumulator.firstNonNumeric,
    levels: accumulator.hasLevels ? accumulator.levels : null,
    codes: accumulator.hasLevels ? Array.from(accumulator.takeCodes()) : null,
  });
  return {
    ...raw,
    label: column(raw.label),
    features: raw.features.map(column),
    labelValues: Array.from(raw.labelValues),
    featureValues: Array.from(raw.featureValues),
    shardCodes: Array.from(raw.shardCodes),
  };
}

async function readBoth(file: string, threads: number, dropUnassignedRows = false) {
  const options = { partition: null, dropUnassignedRows };
  const single = await readDataset({ path: file }, "penguins.csv", COLUMNS, options);
  const parts = await readDataset({ path: file }, "penguins.csv", COLUMNS, { ...options, threads });
  return { single: describe_(single), parts: describe_(parts) };
}

describe("reading a CSV in parts on several threads", () => {
  it("gives the single read's dataset for 2 and 3 parts", async () => {
    const file = writePenguins("plain.csv");
    for (const threads of [2, 3]) {
      const { single, parts } = await readBoth(file, threads);
      expect(parts).toEqual(single);
    }
  });

  it("gives the single read's dataset for Windows line ends and blank lines", async () => {
    const file = writePenguins(
      "crlf.csv",
      (line, index) => (index % 50 === 7 ? `${line}\r\n` : line),
      "\r\n",
    );
    const { single, parts } = await readBoth(file, 3);
    expect(parts).toEqual(single);
    expect(parts.totalRows).toBe(344);
  });

  it("keeps first appearances, dropped rows and unassigned rows across parts", async () => {
    // Row 300 (in the last part) brings a new sex level; rows 10 and 250 lose their label; rows
    // 20 and 320 their shard.
    const file = writePenguins("edited.csv", (line, index) => {
      const fields = line.split(",");
      if (index === 300) fields[fields.length - 1] = "unknown";
      if (index === 10 || index === 250) fields[1] = "";
      if (index === 20 || index === 320) fields[0] = "NA";
      return fields.join(",");
    });
    const { single, parts } = await readBoth(file, 3, true);
    expect(parts).toEqual(single);
    expect(parts.droppedMissingLabel).toBe(2);
    expect(parts.droppedUnassigned).toBe(2);
    const strict = readDataset({ path: file }, "penguins.csv", COLUMNS, {
      partition: null,
      dropUnassignedRows: false,
      threads: 3,
    });
    await expect(strict).rejects.toThrow(/2 data rows with a label have no shard \(rows 20, 320\)/);
  });

  it("names the same row as a single read for a bad row in a later part", async () => {
    const file = writePenguins("bad.csv", (line, index) => (index === 280 ? `${line},9` : line));
    const single = readDataset({ path: file }, "bad.csv", COLUMNS, {
      partition: null,
      dropUnassignedRows: false,
    });
    await expect(single).rejects.toThrow(/data row 280 .*the row has 8 fields/);
    const parts = readDataset({ path: file }, "bad.csv", COLUMNS, {
      partition: null,
      dropUnassignedRows: false,
      threads: 3,
    });
    await expect(parts).rejects.toThrow(/data row 280 .*the row has 8 fields/);
  });

  it("reads a file with quoted fields on one thread, with the same result", async () => {
    const file = writePenguins("quoted.csv", (line, index) =>
      index === 5 ? line.replace("Adelie", '"Adelie"') : line,
    );
    const { single, parts } = await readBoth(file, 2);
    expect(parts).toEqual(single);
  });

  it("gives the same summary end to end on two threads as on one", async () => {
    const file = writePenguins("summary.csv");
    const run = (threads: number) =>
      analyzePartition({ data: { path: file }, options: COLUMNS, threads });
    expect(await run(2)).toEqual(await run(1));
  });
});
