// Reading a dataset keeps the rows methods.md §1 keeps: a row with a missing label is dropped and
// counted, a labelled row without a shard is unassigned, every other row is kept with its feature
// numbers. Outside reference: pandas reading the same CSV as text (dtype=str, no missing-value
// guessing), with §1's missing tokens (trimmed, any case) and pd.to_numeric for the numbers. The
// gzip copy is made by Node's zlib and the Parquet copy by hyparquet-writer (used in tests only).
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { Readable } from "node:stream";
import { gzipSync } from "node:zlib";
import { parquetWriteBuffer } from "hyparquet-writer";
import { describe, expect, it } from "vitest";
import { readPartitionMap } from "@/lib/analysis/partition-map";
import {
  readDataset,
  type DatasetColumnChoice,
  type RawDataset,
  type ReadDatasetOptions,
} from "@/lib/analysis/read-dataset";
import type { TableSource } from "@/lib/analysis/table-reader";
import { PYTHON_TOKEN_RULES, runPythonJson } from "./support/run-python";

const CSV = [
  "id,x,kind,note,label,shard",
  "0, 1.5 ,a, g1 ,1,s2",
  "1,2,b,g2,,s1",
  "2,NA,a,g1,0,s1",
  "3,4,c,g3,1,",
  "4,x,b, g2,NA,s3",
  "5,6,a,g3 ,0,s3",
  "6,7,b,g1,2,s2",
  "7,-8.25,a,g2,1, none ",
  "8,9,c,g3,0,s1",
  "",
].join("\n");

const folder = mkdtempSync(path.join(tmpdir(), "partita-read-dataset-"));
const inFolder = (name: string) => path.join(folder, name);
writeFileSync(inFolder("data.csv"), CSV);
writeFileSync(inFolder("data.csv.gz"), gzipSync(CSV));
{
  const [header, ...lines] = CSV.trim().split("\n");
  const rows = lines.map((line) => line.split(","));
  writeFileSync(
    inFolder("data.parquet"),
    new Uint8Array(
      parquetWriteBuffer({
        columnData: header.split(",").map((name, column) => ({
          name,
          data: rows.map((fields) => fields[column]),
          type: "STRING" as const,
        })),
        rowGroupSize: 4,
      }),
    ),
  );
}

interface Reference {
  totalRows: number;
  droppedMissingLabel: number;
  keptIndices: number[];
  unassignedIndices: number[];
  labels: number[];
  shards: string[];
  notes: string[];
  /** Per feature column (all but label and shard, in header order), its numbers in kept rows. */
  features: Record<string, (number | null)[]>;
}

/** Outside reference: pandas with §1's token rules. */
const reference = runPythonJson<Reference>(
  `import sys, io, json, math
import pandas as pd
${PYTHON_TOKEN_RULES}
frame = pd.read_csv(io.StringIO(json.load(sys.stdin)), dtype=str, keep_default_na=False)
labelled = frame[~frame.label.map(missing)]
kept = labelled[~labelled.shard.map(missing)]
numbers = lambda column: [None if math.isnan(v) else v for v in pd.to_numeric(kept[column].str.strip(), errors="coerce")]
print(json.dumps({
    "totalRows": len(frame),
    "droppedMissingLabel": int(frame.label.map(missing).sum()),
    "keptIndices": kept.index.tolist(),
    "unassignedIndices": labelled.index.difference(kept.index).tolist(),
    "labels": numbers("label"),
    "shards": kept.shard.str.strip().tolist(),
    "notes": kept.note.str.strip().tolist(),
    "features": {column: numbers(column) for column in frame.columns if column not in ("label", "shard")}}))`,
  CSV,
);

const SHARD_COLUMNS: DatasetColumnChoice = { labelColumn: "label", shardColumn: "shard" };

/** The kept rows' numbers of each feature, NaN as null, from the row-major values with their free slot. */
function featureColumns(raw: RawDataset): Record<string, (number | null)[]> {
  const width = raw.features.length + 1;
  expect(raw.featureValues).toHaveLength(raw.keptRows * width);
  return Object.fromEntries(
    raw.features.map((feature, k) => [
      feature.name,
      Array.from({ length: raw.keptRows }, (_, row) => {
        const value = raw.featureValues[row * width + k];
        return Number.isNaN(value) ? null : value;
      }),
    ]),
  );
}

/** The kept rows' shard ids in file order. */
const shardsOf = (raw: RawDataset) => Array.from(raw.shardCodes, (code) => raw.shardIds[code]);

async function readShardColumn(
  source: TableSource,
  options: Partial<ReadDatasetOptions> = {},
  columns: Partial<DatasetColumnChoice> = {},
): Promise<RawDataset> {
  return readDataset(
    source,
    "data.csv",
    { ...SHARD_COLUMNS, ...columns },
    { partition: null, dropUnassignedRows: true, ...options, memory: undefined },
  );
}

describe("reading a dataset (methods.md §1)", () => {
  it("keeps, drops and counts the rows pandas does, with their numbers and shards", async () => {
    const progress: number[] = [];
    const raw = await readShardColumn(Readable.from([CSV]), {
      onBytesRead: (done) => progress.push(done),
    });
    expect(raw.fileName).toBe("data.csv");
    expect(raw.totalRows).toBe(reference.totalRows);
    expect(raw.keptRows).toBe(reference.keptIndices.length);
    expect(raw.droppedMissingLabel).toBe(reference.droppedMissingLabel);
    expect(raw.droppedUnassigned).toBe(reference.unassignedIndices.length);
    expect(Array.from(raw.labelValues)).toEqual(reference.labels);
    expect(raw.label.name).toBe("label");
    expect(featureColumns(raw)).toEqual(reference.features);
    expect(shardsOf(raw)).toEqual(reference.shards);
    // Shard ids in the order they first appear among kept rows.
    expect(raw.shardIds).toEqual([...new Set(reference.shards)]);
    expect(raw.featuresNamed).toBe(false);
    expect(raw.format).toEqual({ encoding: "utf-8", delimiter: ",", decimalMark: "." });
    // A CSV's progress counts its characters, ending at all of them.
    expect(progress.at(-1)).toBe(CSV.length);
  });

  it("reads the same from gzip CSV and Parquet files, and with threads to share the work", async () => {
    const fromStream = await readShardColumn(Readable.from([CSV]));
    const sameRows = (raw: RawDataset) => ({
      totalRows: raw.totalRows,
      keptRows: raw.keptRows,
      dropped: [raw.droppedMissingLabel, raw.droppedUnassigned],
      labels: Array.from(raw.labelValues),
      features: featureColumns(raw),
      shards: shardsOf(raw),
    });
    for (const file of ["data.csv", "data.csv.gz", "data.parquet"]) {
      for (const threads of [1, 2]) {
        const raw = await readShardColumn({ path: inFolder(file) }, { threads });
        expect(sameRows(raw)).toEqual(sameRows(fromStream));
        // Parquet's values are typed: there is no text format to state.
        expect(raw.format).toEqual(file === "data.parquet" ? null : fromStream.format);
      }
    }
  });

  it("keeps only the named features, and says they were named", async () => {
    const raw = await readShardColumn(Readable.from([CSV]), {}, { features: ["x", "id"] });
    expect(raw.features.map((feature) => feature.name)).toEqual(["x", "id"]);
    expect(featureColumns(raw)).toEqual({ x: reference.features.x, id: reference.features.id });
    expect(raw.featuresNamed).toBe(true);
  });

  it("hands over the trimmed text of chosen columns for kept rows only, numbered as in the file", async () => {
    const handed: { values: string[]; rowIndex: number }[] = [];
    const keptRowText = {
      columns: [
        { name: "note", role: "group" },
        { name: "id", role: "row id" },
      ],
      onRow: (values: string[], rowIndex: number) => handed.push({ values, rowIndex }),
    };
    await readShardColumn(Readable.from([CSV]), { keptRowText, firstRowIndex: 100 });
    expect(handed).toEqual(
      reference.keptIndices.map((index, k) => ({
        values: [reference.notes[k], String(index)],
        rowIndex: 100 + index,
      })),
    );
    await expect(
      readShardColumn(Readable.from([CSV]), {
        keptRowText: { ...keptRowText, columns: [{ name: "team", role: "group" }] },
      }),
    ).rejects.toThrow(/^data\.csv, column "team": there is no group column "team"/);
  });

  it("assigns rows by a partition map, and refuses labelled rows left without a shard", async () => {
    const assigned = reference.keptIndices.concat(reference.unassignedIndices.slice(1));
    const map = `row_id,shard\n${assigned.map((index) => `${index},m${index % 2}`).join("\n")}\n`;
    // A map is used up by one read (it marks the ids it matched), so each read gets its own.
    const readMap = () => readPartitionMap(Readable.from([map]), "map.csv", { byRowIndex: true });
    const raw = await readDataset(
      Readable.from([CSV]),
      "data.csv",
      { labelColumn: "label" },
      { partition: await readMap(), dropUnassignedRows: true },
    );
    expect(raw.keptRows).toBe(assigned.length);
    expect(raw.droppedUnassigned).toBe(1);
    expect(shardsOf(raw)).toEqual(assigned.sort((a, b) => a - b).map((index) => `m${index % 2}`));
    const strict = readDataset(
      Readable.from([CSV]),
      "data.csv",
      { labelColumn: "label" },
      { partition: await readMap(), dropUnassignedRows: false },
    );
    await expect(strict).rejects.toThrow(
      `map.csv, column "row_id": 1 data rows with a label have no shard (rows ${reference.unassignedIndices[0]})`,
    );
  });
});
