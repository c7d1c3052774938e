// Every table goes through one reader whatever its format and source (methods.md §1): the rows it
// gives must be those CPython's csv module reads from the same text. The gzip data is made, and its
// faults confirmed, by CPython's gzip module; the Parquet file is written by hyparquet-writer (used
// in tests only) from the same fields. Formats are told apart by their magic numbers: gzip's
// 0x1f 0x8b (RFC 1952 §2.3.1) and Parquet's "PAR1" (Apache Parquet's file format).
import { createReadStream, mkdtempSync, readdirSync, readlinkSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { Readable } from "node:stream";
import { parquetWriteBuffer } from "hyparquet-writer";
import { describe, expect, it } from "vitest";
import { AnalysisInputError } from "@/lib/analysis/errors";
import { cutParquetIntoParts, readParquetLayout } from "@/lib/analysis/parquet-reader";
import {
  detectLocalTableFormat,
  detectTableFormat,
  isLocalFile,
  readTable,
  type TableSource,
} from "@/lib/analysis/table-reader";
import type { CsvFormat, CsvFormatChoice } from "@/lib/analysis/text-format";
import { runPythonJson } from "./support/run-python";

const folder = mkdtempSync(path.join(tmpdir(), "partita-table-reader-"));
const inFolder = (name: string) => path.join(folder, name);

/** 3000 rows: an id, a text field needing quotes (commas, quotes, a line break), a number, some missing. */
const ROWS = 3000;
const CSV = [
  "id,name,value",
  ...Array.from({ length: ROWS }, (_, i) => {
    const name = i % 5 === 0 ? `"Müller, ""${i}""\nline"` : `item ${i}`;
    return `${i},${name},${i % 7 === 0 ? "" : String(i / 8)}`;
  }),
].join("\r\n");

/**
 * Outside reference: CPython's csv module reading CSV, and its gzip module compressing the text
 * (mtime 0) and telling how a cut copy and a copy with an unknown compression method fail.
 */
const reference = runPythonJson<{
  header: string[];
  rows: string[][];
  gzip: string;
  cutError: string;
  methodError: string;
}>(
  `import sys, json, io, csv, gzip, base64
text = json.load(sys.stdin)
rows = list(csv.reader(io.StringIO(text, newline="")))
packed = gzip.compress(text.encode("utf-8"), mtime=0)
def failure(data):
    try:
        gzip.decompress(data)
    except Exception as error:
        return type(error).__name__
    return ""
wrong_method = packed[:2] + bytes([7]) + packed[3:]
print(json.dumps({"header": rows[0], "rows": rows[1:], "gzip": base64.b64encode(packed).decode(),
    "cutError": failure(packed[:-40]), "methodError": failure(wrong_method)}))`,
  CSV,
);
const gzipBytes = Buffer.from(reference.gzip, "base64");

/** The same fields as Parquet: id and value DOUBLE (value null where empty), name STRING. */
function writeParquet(rowGroupSize: number): Uint8Array {
  const column = (index: number) => reference.rows.map((fields) => fields[index]);
  const numbers = (index: number) =>
    column(index).map((field) => (field === "" ? null : Number(field)));
  return new Uint8Array(
    parquetWriteBuffer({
      columnData: [
        { name: "id", data: numbers(0), type: "DOUBLE", nullable: true },
        { name: "name", data: column(1), type: "STRING", nullable: true },
        { name: "value", data: numbers(2), type: "DOUBLE", nullable: true },
      ],
      rowGroupSize,
    }),
  );
}
const parquetBytes = writeParquet(700);

writeFileSync(inFolder("table.csv"), CSV);
writeFileSync(inFolder("table.csv.gz"), gzipBytes);
writeFileSync(inFolder("table.parquet"), parquetBytes);

interface Read {
  header: string[];
  format: CsvFormat | undefined;
  rows: string[][];
  indices: number[];
  count: number;
  progress: number[];
}

async function read(
  source: TableSource,
  fileName: string,
  textFormat?: CsvFormatChoice,
  firstRowIndex?: number,
): Promise<Read> {
  const result: Read = {
    header: [],
    format: undefined,
    rows: [],
    indices: [],
    count: 0,
    progress: [],
  };
  result.count = await readTable(
    source,
    fileName,
    {
      onHeader(columns, format) {
        result.header = columns;
        result.format = format;
      },
      onRow(fields, rowIndex) {
        result.rows.push([...fields]);
        result.indices.push(rowIndex);
      },
      onProgress(done) {
        result.progress.push(done);
      },
    },
    textFormat,
    firstRowIndex,
  );
  return result;
}

/** `bytes` as a stream of pieces of `sizes` bytes in turn (the last size repeating). */
function streamPieces(bytes: Uint8Array, sizes: number[]): Readable {
  const pieces: Buffer[] = [];
  let start = 0;
  for (let k = 0; start < bytes.length; k++) {
    const size = sizes[Math.min(k, sizes.length - 1)];
    pieces.push(Buffer.from(bytes.subarray(start, start + size)));
    start += size;
  }
  return Readable.from(pieces);
}

const indicesFrom = (first: number) => Array.from({ length: ROWS }, (_, i) => first + i);

function expectReferenceRows(result: Read, first = 0): void {
  expect(result.header).toEqual(reference.header);
  expect(result.rows).toEqual(reference.rows);
  expect(result.indices).toEqual(indicesFrom(first));
  expect(result.count).toBe(ROWS);
}

const nondecreasing = (values: number[]) => values.every((v, i) => i === 0 || v >= values[i - 1]);

describe("telling formats apart (RFC 1952, Apache Parquet)", () => {
  it("knows gzip and Parquet by their whole magic numbers, and takes anything else as CSV", async () => {
    expect(detectTableFormat(gzipBytes)).toBe("csv.gz");
    expect(detectTableFormat(parquetBytes)).toBe("parquet");
    expect(detectTableFormat(new TextEncoder().encode(CSV))).toBe("csv");
    // A magic number cut short, off by a bit or not at the start is not one.
    expect(detectTableFormat(parquetBytes.subarray(0, 3))).toBe("csv");
    expect(detectTableFormat(gzipBytes.subarray(0, 1))).toBe("csv");
    expect(detectTableFormat(Uint8Array.of(0x1f, 0x8a, 0x08))).toBe("csv");
    expect(detectTableFormat(new TextEncoder().encode("PAR2"))).toBe("csv");
    expect(detectTableFormat(new TextEncoder().encode("QAR1"))).toBe("csv");
    expect(detectTableFormat(new TextEncoder().encode(" PAR1"))).toBe("csv");
    expect(detectTableFormat(Uint8Array.of(0x00, 0x1f, 0x8b))).toBe("csv");
    expect(detectTableFormat(new Uint8Array(0))).toBe("csv");
    expect(await detectLocalTableFormat(inFolder("table.csv.gz"))).toBe("csv.gz");
    expect(await detectLocalTableFormat(inFolder("table.parquet"))).toBe("parquet");
    expect(await detectLocalTableFormat(inFolder("table.csv"))).toBe("csv");
    // A file shorter than Parquet's magic number is read as far as it goes.
    writeFileSync(inFolder("short.gz"), gzipBytes.subarray(0, 2));
    expect(await detectLocalTableFormat(inFolder("short.gz"))).toBe("csv.gz");
  });
});

describe("sources", () => {
  it("takes a local file by its path, and a stream as a stream even when it has a path", () => {
    expect(isLocalFile({ path: inFolder("table.csv") })).toBe(true);
    const stream = createReadStream(inFolder("table.csv"));
    expect(isLocalFile(stream)).toBe(false);
    stream.destroy();
    const parquet = { byteLength: 0, slice: () => new ArrayBuffer(0) };
    expect(isLocalFile({ parquet, start: 0, end: 0 })).toBe(false);
  });

  it("closes a local file after looking at its first bytes", async () => {
    const target = inFolder("table.parquet");
    // Linux lists a process's open files in /proc/self/fd, each a link to the file.
    const openOnTarget = () =>
      readdirSync("/proc/self/fd").filter((fd) => {
        try {
          return readlinkSync(`/proc/self/fd/${fd}`) === target;
        } catch {
          return false; // closed meanwhile
        }
      }).length;
    for (let k = 0; k < 3; k++) await detectLocalTableFormat(target);
    expect(openOnTarget()).toBe(0);
  });
});

describe("reading a table like CPython's csv module reads its CSV", () => {
  it("reads CSV from a local file, a byte stream in any pieces and a text stream", async () => {
    const bytes = new TextEncoder().encode(CSV);
    const fromFile = await read({ path: inFolder("table.csv") }, "table.csv");
    expectReferenceRows(fromFile);
    expect(fromFile.format).toEqual({ encoding: "utf-8", delimiter: ",", decimalMark: "." });
    // Single bytes first, so the first four bytes arrive in four pieces; then large pieces.
    const fromPieces = await read(streamPieces(bytes, [1, 1, 1, 1, 1, 4093]), "table.csv");
    expectReferenceRows(fromPieces);
    expect(fromPieces.format).toEqual(fromFile.format);
    // CSV progress counts characters decoded, ending at all of them.
    expect(fromPieces.progress.at(-1)).toBe(CSV.length);
    const fromText = await read(Readable.from([CSV.slice(0, 2), CSV.slice(2)]), "table.csv");
    expectReferenceRows(fromText);
    const fromShortHead = await read(streamPieces(bytes, [2, 3]), "table.csv");
    expectReferenceRows(fromShortHead);
  });

  it("numbers a streamed part's rows from the index it is given", async () => {
    expectReferenceRows(await read(Readable.from([CSV]), "table.csv", {}, 1000), 1000);
  });

  it("reads a file shorter than a magic number, and names an empty one", async () => {
    expect(await read(Readable.from([Buffer.from("a\n")]), "tiny.csv")).toMatchObject({
      header: ["a"],
      rows: [],
      count: 0,
    });
    await expect(read(Readable.from([]), "empty.csv")).rejects.toThrow(
      "empty.csv: the file is empty (expected a header row)",
    );
  });

  it("follows a chosen delimiter in plain and gzip CSV, from a file and a stream", async () => {
    const semicolons = CSV.replace(/,/g, ";");
    const python = runPythonJson<{ rows: string[][]; gzip: string }>(
      `import sys, json, io, csv, gzip, base64
text = json.load(sys.stdin)
print(json.dumps({"rows": list(csv.reader(io.StringIO(text, newline=""), delimiter=";")),
    "gzip": base64.b64encode(gzip.compress(text.encode("utf-8"), mtime=0)).decode()}))`,
      semicolons,
    );
    const packed = Buffer.from(python.gzip, "base64");
    writeFileSync(inFolder("semicolons.csv"), semicolons);
    writeFileSync(inFolder("semicolons.csv.gz"), packed);
    // Chosen as a comma, the semicolon-delimited text is one column per row.
    const choice: CsvFormatChoice = { delimiter: ",", decimalMark: "," };
    const sources: TableSource[] = [
      { path: inFolder("semicolons.csv") },
      { path: inFolder("semicolons.csv.gz") },
      Readable.from([packed]),
      Readable.from([semicolons]),
    ];
    for (const source of sources) {
      const result = await read(source, "semicolons.csv", choice);
      expect(result.format).toEqual({ encoding: "utf-8", delimiter: ",", decimalMark: "," });
      expect(result.header).toEqual([python.rows[0].join(";")]);
    }
    for (const source of [{ path: inFolder("semicolons.csv.gz") }, Readable.from([packed])]) {
      const result = await read(source, "semicolons.csv.gz");
      expect(result.format?.delimiter).toBe(";");
      expect([result.header, ...result.rows]).toEqual(python.rows);
    }
  });
});

describe("gzip-compressed CSV", () => {
  it("reads CPython's gzip output from a file and a stream, counting compressed bytes", async () => {
    for (const source of [{ path: inFolder("table.csv.gz") }, streamPieces(gzipBytes, [3, 1000])]) {
      const result = await read(source, "table.csv.gz");
      expectReferenceRows(result);
      // Progress compares with the compressed file's size: it ends there and never passes it.
      expect(result.progress.at(-1)).toBe(gzipBytes.length);
      expect(nondecreasing(result.progress)).toBe(true);
    }
  });

  it("names the file when the data cannot be decompressed, as CPython's gzip also fails", async () => {
    expect(reference.cutError).toBe("EOFError");
    expect(reference.methodError).toBe("BadGzipFile");
    const cut = gzipBytes.subarray(0, gzipBytes.length - 40);
    writeFileSync(inFolder("cut.csv.gz"), cut);
    const expected =
      "cut.csv.gz: the gzip data cannot be decompressed (unexpected end of file) (expected a complete gzip-compressed CSV (.csv.gz))";
    await expect(read({ path: inFolder("cut.csv.gz") }, "cut.csv.gz")).rejects.toThrow(expected);
    const fromStream = read(Readable.from([cut]), "cut.csv.gz");
    await expect(fromStream).rejects.toBeInstanceOf(AnalysisInputError);
    await expect(fromStream).rejects.toThrow(expected);
    const wrongMethod = Buffer.from(gzipBytes);
    wrongMethod[2] = 7;
    await expect(read(Readable.from([wrongMethod]), "bad.csv.gz")).rejects.toThrow(
      /^bad\.csv\.gz: the gzip data cannot be decompressed \(unknown compression method\)/,
    );
  });

  it("passes on a failure of the source stream, naming the file when it is not an input error", async () => {
    const failing = (error: Error) =>
      Readable.from(
        (async function* () {
          yield gzipBytes.subarray(0, 100);
          throw error;
        })(),
      );
    const inputError = new AnalysisInputError("the upload was cut off", { file: "up.csv.gz" });
    await expect(read(failing(inputError), "up.csv.gz")).rejects.toBe(inputError);
    await expect(read(failing(new Error("socket closed")), "up.csv.gz")).rejects.toThrow(
      "up.csv.gz: the gzip data cannot be decompressed (socket closed)",
    );
  });
});

describe("Parquet", () => {
  it("removes the temporary copy of a streamed file", async () => {
    // os.tmpdir() follows TMPDIR, so the copy is made in a folder of this test's own.
    const previous = process.env.TMPDIR;
    process.env.TMPDIR = mkdtempSync(inFolder("tmp-"));
    try {
      expectReferenceRows(await read(Readable.from([parquetBytes]), "table.parquet"));
      expect(readdirSync(process.env.TMPDIR)).toEqual([]);
    } finally {
      if (previous === undefined) delete process.env.TMPDIR;
      else process.env.TMPDIR = previous;
    }
  });

  it("reads the same rows from a local file, a stream and parts cut by row groups", async () => {
    expectReferenceRows(await read({ path: inFolder("table.parquet") }, "table.parquet"));
    expectReferenceRows(await read(streamPieces(parquetBytes, [2, 5000]), "table.parquet"));
    const file = {
      byteLength: parquetBytes.byteLength,
      slice: (start: number, end?: number) => parquetBytes.slice(start, end).buffer,
    };
    const layout = await readParquetLayout(file, "table.parquet");
    const parts = cutParquetIntoParts(layout, parquetBytes.byteLength, 3);
    expect(parts).toHaveLength(3);
    const results = [];
    for (const { start, end } of parts ?? []) {
      results.push(await read({ parquet: file, start, end }, "table.parquet"));
    }
    expect(results.map((result) => result.header)).toEqual(results.map(() => reference.header));
    expect(results.flatMap((result) => result.rows)).toEqual(reference.rows);
    expect(results.flatMap((result) => result.indices)).toEqual(indicesFrom(0));
    expect(results.map((result) => result.count)).toEqual(
      results.map((result) => result.rows.length),
    );
  });
});
