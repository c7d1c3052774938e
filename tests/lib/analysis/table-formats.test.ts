// Parquet and gzip-compressed CSV go through the same methods.md §1 rules as CSV: the summary of
// the same table must be identical whatever the format. The table is the penguins data of the
// `vega-datasets` npm package (BSD-3-Clause; Palmer penguins, Gorman, Williams & Fraser 2014).
// The gzip files are made by Debian's gzip command; the Parquet files by hyparquet-writer (a
// Parquet writer used in the tests only; Debian packages no Parquet writer for Python here), with
// typed columns (DOUBLE with nulls, STRING, INT32), snappy pages and several row groups.
import { execFileSync } from "node:child_process";
import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { Readable } from "node:stream";
import { parquetWriteBuffer } from "hyparquet-writer";
import { beforeAll, describe, expect, it } from "vitest";
import {
  analyzePartition,
  AnalysisInputError,
  computeSchemaDigest,
  readClientRows,
  type PartitionSummary,
} from "@/lib/analysis";
import type { TableSource } from "@/lib/analysis/table-reader";
import { loadPenguinsCsv, loadPenguinsRecords } from "./support/open-data";

const OPTIONS = { labelColumn: "Species", idColumn: "row" } as const;
const folder = mkdtempSync(path.join(tmpdir(), "partita-formats-"));
const inFolder = (name: string) => path.join(folder, name);

function analyze(data: TableSource, partition: TableSource): Promise<PartitionSummary> {
  return analyzePartition({
    data,
    dataName: "penguins",
    partition,
    partitionName: "islands",
    options: OPTIONS,
    threads: 1,
  });
}

/** The penguins table as Parquet, with each column's natural type and `rowGroupSize` rows a group. */
function writePenguinsParquet(rowGroupSize: number): { data: Uint8Array; map: Uint8Array } {
  const records = loadPenguinsRecords();
  const names = Object.keys(records[0]);
  const columnData = [
    { name: "row", data: Int32Array.from(records, (_, index) => index), type: "INT32" as const },
    ...names.map((name) => {
      const values = records.map((record) => record[name]);
      const numeric = values.every((value) => value === null || typeof value === "number");
      return {
        name,
        data: values,
        type: numeric ? ("DOUBLE" as const) : ("STRING" as const),
        nullable: true,
      };
    }),
  ];
  const data = new Uint8Array(parquetWriteBuffer({ columnData, rowGroupSize }));
  const map = new Uint8Array(
    parquetWriteBuffer({
      columnData: [
        { name: "row_id", data: records.map((_, index) => index), type: "INT32" },
        { name: "shard", data: records.map((record) => record.Island), type: "STRING" },
      ],
      rowGroupSize,
    }),
  );
  return { data, map };
}

let csvSummary: PartitionSummary;

beforeAll(async () => {
  const { csv, islandMap } = loadPenguinsCsv();
  writeFileSync(inFolder("penguins.csv"), csv);
  writeFileSync(inFolder("islands.csv"), islandMap);
  for (const name of ["penguins.csv", "islands.csv"]) {
    execFileSync("/usr/bin/gzip", ["--keep", "--force", inFolder(name)]);
  }
  const parquet = writePenguinsParquet(100);
  writeFileSync(inFolder("penguins.parquet"), parquet.data);
  writeFileSync(inFolder("islands.parquet"), parquet.map);
  csvSummary = await analyze({ path: inFolder("penguins.csv") }, { path: inFolder("islands.csv") });
});

const streamOf = (file: string) => Readable.from([readFileSync(inFolder(file))]);

describe("dataset and partition map formats", () => {
  it("reads the CSV itself: 344 penguins, 3 species, 3 islands", () => {
    // vega-datasets documents 344 penguins of 3 species on 3 islands.
    expect(csvSummary.preprocessing.totalRows).toBe(344);
    expect(csvSummary.dataset.classNames).toEqual(["Adelie", "Chinstrap", "Gentoo"]);
    expect(csvSummary.shards.map((shard) => shard.id)).toEqual(["Biscoe", "Dream", "Torgersen"]);
  });

  it("gives the CSV's summary for gzip-compressed CSV, from a local file and from a stream", async () => {
    const fromFile = await analyze(
      { path: inFolder("penguins.csv.gz") },
      { path: inFolder("islands.csv.gz") },
    );
    expect(fromFile).toEqual(csvSummary);
    const fromStream = await analyze(streamOf("penguins.csv.gz"), streamOf("islands.csv.gz"));
    expect(fromStream).toEqual(csvSummary);
  });

  it("gives the CSV's summary for Parquet (4 row groups), from a local file and from a stream", async () => {
    const fromFile = await analyze(
      { path: inFolder("penguins.parquet") },
      { path: inFolder("islands.parquet") },
    );
    // A Parquet file has no text format to state (methods.md §1); everything else is the CSV's.
    const withoutTextFormat = { ...csvSummary.preprocessing, format: null };
    expect(fromFile).toEqual({ ...csvSummary, preprocessing: withoutTextFormat });
    const fromStream = await analyze(streamOf("penguins.parquet"), streamOf("islands.csv"));
    expect(fromStream).toEqual({ ...csvSummary, preprocessing: withoutTextFormat });
  });

  it("gives a federated client the CSV's round-1 digest from gzip CSV and Parquet", async () => {
    const schemaOf = async (data: string, partition: string) =>
      computeSchemaDigest(
        await readClientRows({
          data: { path: inFolder(data) },
          dataName: "penguins",
          partition: { path: inFolder(partition) },
          partitionName: "islands",
          columns: OPTIONS,
        }),
        { client: "c1" },
      );
    const fromCsv = await schemaOf("penguins.csv", "islands.csv");
    expect(await schemaOf("penguins.csv.gz", "islands.csv.gz")).toEqual(fromCsv);
    expect(await schemaOf("penguins.parquet", "islands.parquet")).toEqual(fromCsv);
  });

  it("names the file when gzip data is cut short", async () => {
    const whole = readFileSync(inFolder("penguins.csv.gz"));
    writeFileSync(inFolder("cut.csv.gz"), whole.subarray(0, whole.length - 40));
    const run = analyzePartition({
      data: { path: inFolder("cut.csv.gz") },
      dataName: "cut.csv.gz",
      partition: { path: inFolder("islands.csv") },
      options: OPTIONS,
    });
    await expect(run).rejects.toThrow(AnalysisInputError);
    await expect(run).rejects.toThrow(/cut\.csv\.gz: the gzip data cannot be decompressed/);
  });

  it("names the file when a Parquet file is cut short", async () => {
    const whole = readFileSync(inFolder("penguins.parquet"));
    writeFileSync(inFolder("cut.parquet"), whole.subarray(0, whole.length - 100));
    const run = analyzePartition({
      data: { path: inFolder("cut.parquet") },
      dataName: "cut.parquet",
      partition: { path: inFolder("islands.csv") },
      options: OPTIONS,
    });
    await expect(run).rejects.toThrow(/cut\.parquet: the Parquet footer cannot be read/);
  });
});
