// Previews of gzip CSV and Parquet uploads, from ranged reads only. The table is the penguins data
// of the `vega-datasets` npm package (BSD-3-Clause; its documented columns: species, island and sex
// are text, the four body measurements numbers). The gzip file is made by Node's zlib, the Parquet
// file by hyparquet-writer (used in tests only) with typed columns; each preview must show the same
// rows as the CSV's preview, and Parquet's column types come from its schema.
import { gzipSync } from "node:zlib";
import { parquetWriteBuffer } from "hyparquet-writer";
import { describe, expect, it } from "vitest";
import { AnalysisInputError } from "@/lib/analysis/errors";
import { SeededRandom } from "@/lib/math/random";
import { PREVIEW_BYTES } from "@/lib/uploads/csv-preview";
import { inspectDataset } from "@/lib/uploads/inspect-upload";
import { readTableHead, summarizeTableHead } from "@/lib/uploads/table-preview";
import { loadPenguinsCsv, loadPenguinsRecords } from "@/tests/lib/analysis/support/open-data";

const { csv } = loadPenguinsCsv();
const csvBytes = new TextEncoder().encode(csv);
const csvPreview = inspectDataset({
  bytes: csvBytes.subarray(0, PREVIEW_BYTES),
  totalBytes: csvBytes.length,
  fileName: "penguins.csv",
});

/** Serves ranges of `bytes` and records them, to check that only ranges are read. */
function rangeReader(bytes: Uint8Array) {
  const ranges: [number, number][] = [];
  const read = async (start: number, end: number) => {
    ranges.push([start, end]);
    return bytes.slice(start, end);
  };
  return { read, ranges };
}

function penguinsParquet(): Uint8Array {
  const records = loadPenguinsRecords();
  const names = Object.keys(records[0]);
  return new Uint8Array(
    parquetWriteBuffer({
      columnData: [
        { name: "row", data: Int32Array.from(records, (_, index) => index), type: "INT32" },
        ...names.map((name) => {
          const values = records.map((record) => record[name]);
          const numeric = values.every((value) => value === null || typeof value === "number");
          return {
            name,
            data: values,
            type: numeric ? "DOUBLE" : "STRING",
            nullable: true,
          } as const;
        }),
      ],
      rowGroupSize: 100,
    }),
  );
}

describe("previews of compressed and columnar uploads", () => {
  it("shows a gzip CSV like the CSV it holds", async () => {
    const gzip = gzipSync(csvBytes);
    const { read } = rangeReader(gzip);
    const preview = summarizeTableHead(await readTableHead(read, gzip.length, "penguins.csv.gz"));
    expect(preview).toEqual(csvPreview);
  });

  it("shows the first rows of a large gzip CSV from its first bytes only, marked as cut", async () => {
    // Seeded random rows after the real ones, so the compressed file outgrows the preview's bytes.
    const random = new SeededRandom(7);
    const filler = Array.from(
      { length: 40_000 },
      (_, index) => `${344 + index},Adelie,Dream,${random.uniform()},${random.uniform()},,,`,
    );
    const large = new TextEncoder().encode(`${csv}${filler.join("\n")}\n`);
    const gzip = gzipSync(large);
    expect(gzip.length).toBeGreaterThan(PREVIEW_BYTES);
    const { read, ranges } = rangeReader(gzip);
    const preview = summarizeTableHead(await readTableHead(read, gzip.length, "big.csv.gz"));
    expect(ranges).toEqual([[0, PREVIEW_BYTES]]);
    expect(preview.truncated).toBe(true);
    expect(preview.rows).toEqual(csvPreview.rows);
  });

  it("shows a Parquet file's first rows and its schema's column types", async () => {
    const parquet = penguinsParquet();
    const { read } = rangeReader(parquet);
    const preview = summarizeTableHead(
      await readTableHead(read, parquet.length, "penguins.parquet"),
    );
    expect(preview.rows).toEqual(csvPreview.rows);
    expect(preview.truncated).toBe(true);
    expect(Object.fromEntries(preview.columns.map((column) => [column.name, column.type]))).toEqual(
      {
        row: "numeric",
        Species: "categorical",
        Island: "categorical",
        "Beak Length (mm)": "numeric",
        "Beak Depth (mm)": "numeric",
        "Flipper Length (mm)": "numeric",
        "Body Mass (g)": "numeric",
        Sex: "categorical",
      },
    );
  });

  it("names the file when a Parquet upload has no readable footer", async () => {
    const parquet = penguinsParquet().slice(0, 2000);
    const { read } = rangeReader(parquet);
    const head = readTableHead(read, parquet.length, "cut.parquet");
    await expect(head).rejects.toThrow(AnalysisInputError);
    await expect(head).rejects.toThrow(/^cut\.parquet: the Parquet footer cannot be read/);
  });
});
