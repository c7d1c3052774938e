// A Parquet file is read like the CSV of the same table (methods.md §1): each value as the text a
// CSV would hold. The files are written by hyparquet-writer (used in tests only; Debian packages no
// Parquet writer for Python here) with a schema stating each column's physical and logical type.
// Outside references: Apache Parquet's format (the "PAR1" magic before the first column chunk, a
// row group's column chunks stored one after another) and LogicalTypes.md (which annotations are
// numbers: integers of any width and sign, decimals; not dates, times, timestamps, text or
// booleans); CPython for the text of values: float() must read a number's text back as the same
// double, datetime gives a date's ISO form, json.dumps a nested value's JSON.
import { parquetWriteBuffer } from "hyparquet-writer";
import { describe, expect, it } from "vitest";
import { AnalysisInputError } from "@/lib/analysis/errors";
import {
  cutParquetIntoParts,
  findGroupsIn,
  readParquetHead,
  readParquetLayout,
  readParquetRowGroups,
  toField,
  type AsyncBuffer,
  type ParquetLayout,
} from "@/lib/analysis/parquet-reader";
import { runPythonJson } from "./support/run-python";

type Element = Record<string, unknown> & { name: string };

/** An AsyncBuffer over bytes in memory, as a stored file is read by ranges. */
function bufferOf(bytes: Uint8Array): AsyncBuffer {
  return {
    byteLength: bytes.byteLength,
    slice: async (start: number, end?: number) => bytes.slice(start, end).buffer,
  };
}

function writeParquet(
  elements: Element[],
  data: Record<string, unknown[]>,
  rowGroupSize: number,
  options: { codec?: "LZO" } = {},
): Uint8Array {
  return new Uint8Array(
    parquetWriteBuffer({
      // The data's keys are the top-level columns; a group's fields follow it in `elements`.
      schema: [{ name: "root", num_children: Object.keys(data).length }, ...elements] as never,
      columnData: Object.entries(data).map(([name, values]) => ({ name, data: values })),
      rowGroupSize,
      // hyparquet-writer writes a codec only with a compressor for it: pages marked LZO but kept
      // as they are stand for a file compressed with a codec the reader lacks (it has no LZO).
      ...(options.codec
        ? { codec: options.codec, compressors: { LZO: (bytes: Uint8Array) => bytes } }
        : {}),
    }),
  );
}

const optional = (name: string, rest: Record<string, unknown>): Element => ({
  name,
  repetition_type: "OPTIONAL",
  ...rest,
});

/** One column per kind of type; numbers as LogicalTypes.md classes them. */
const TYPED_COLUMNS: { element: Element; numeric: boolean }[] = [
  // Text first, with repeats, so the first column chunk opens with a dictionary page.
  { element: optional("text", { type: "BYTE_ARRAY", converted_type: "UTF8" }), numeric: false },
  { element: optional("int32", { type: "INT32" }), numeric: true },
  { element: optional("int8", { type: "INT32", converted_type: "INT_8" }), numeric: true },
  { element: optional("uint64", { type: "INT64", converted_type: "UINT_64" }), numeric: true },
  {
    element: optional("integer", {
      type: "INT64",
      logical_type: { type: "INTEGER", bitWidth: 64, isSigned: true },
    }),
    numeric: true,
  },
  {
    element: optional("decimal", {
      type: "INT32",
      converted_type: "DECIMAL",
      scale: 2,
      precision: 9,
      logical_type: { type: "DECIMAL", scale: 2, precision: 9 },
    }),
    numeric: true,
  },
  { element: optional("float", { type: "FLOAT" }), numeric: true },
  { element: optional("double", { type: "DOUBLE" }), numeric: true },
  { element: optional("date", { type: "INT32", converted_type: "DATE" }), numeric: false },
  { element: optional("time", { type: "INT32", converted_type: "TIME_MILLIS" }), numeric: false },
  {
    element: optional("timestamp", {
      type: "INT64",
      logical_type: { type: "TIMESTAMP", isAdjustedToUTC: true, unit: "MILLIS" },
    }),
    numeric: false,
  },
  { element: optional("flag", { type: "BOOLEAN" }), numeric: false },
];

/** A nested column: a group of two fields, whose values are objects. */
const NESTED: Element[] = [
  optional("point", { num_children: 2 }),
  optional("x", { type: "INT64" }),
  optional("tag", { type: "BYTE_ARRAY", converted_type: "UTF8" }),
];

const DAYS = ["2020-01-02", null, "1970-01-01", "2000-02-29", "2021-12-31"];
const DOUBLES = [0.1, 1e21, 5e-324, null, 1 / 3];
const COLUMN_DATA: Record<string, unknown[]> = {
  text: ["a", "a", null, 'ü, "q"', "a"],
  int32: [1, -2, null, 2147483647, 5],
  int8: [1, -2, 3, -128, 127],
  uint64: [1n, 2n, null, 18446744073709551615n, 5n],
  integer: [1n, -9007199254740993n, 3n, null, 5n],
  decimal: [1.25, -2, 3.5, null, 0.01],
  float: [0.1, 2, null, 3.4028234663852886e38, -1.5],
  double: DOUBLES,
  date: DAYS.map((day) => (day === null ? null : new Date(day))),
  time: [1000, 2000, null, 0, 86399999],
  timestamp: [1n, null, 2n, 1583020800001n, 0n],
  flag: [true, false, null, true, false],
  point: [
    { x: 1n, tag: "a" },
    null,
    { x: 9007199254740993n, tag: null },
    { x: -1n, tag: "b" },
    null,
  ],
};
const ROW_GROUP_SIZE = 2;

const typedBytes = writeParquet(
  [...TYPED_COLUMNS.map(({ element }) => element), ...NESTED],
  COLUMN_DATA,
  ROW_GROUP_SIZE,
);
const typedFile = bufferOf(typedBytes);

async function readAllRows(file: AsyncBuffer, layout: ParquetLayout) {
  const rows: string[][] = [];
  const indices: number[] = [];
  const progress: number[] = [];
  await readParquetRowGroups(file, layout, "typed.parquet", {
    onRow(fields, rowIndex) {
      rows.push([...fields]);
      indices.push(rowIndex);
    },
    onProgress(bytes) {
      progress.push(bytes);
    },
  });
  return { rows, indices, progress };
}

describe("a Parquet file's layout", () => {
  it("names its columns, knows its numeric ones and where each row group starts", async () => {
    const layout = await readParquetLayout(typedFile, "typed.parquet");
    expect(layout.columns).toEqual([...TYPED_COLUMNS.map(({ element }) => element.name), "point"]);
    expect(layout.numeric).toEqual([...TYPED_COLUMNS.map(({ numeric }) => numeric), false]);
    // 5 rows, 2 a row group.
    expect(layout.groupStarts).toEqual([0, 2, 4, 5]);
    // Parquet's layout: "PAR1", then each row group's column chunks one after another, so a
    // group's bytes run from its offset to the next group's.
    expect(layout.groupOffsets[0]).toBe(4);
    for (let group = 0; group + 1 < layout.groupOffsets.length; group++) {
      expect(layout.groupOffsets[group + 1] - layout.groupOffsets[group]).toBe(
        layout.groupBytes[group],
      );
    }
    expect(layout.groupBytes).toHaveLength(3);
    expect(layout.groupBytes.every((bytes) => bytes > 0)).toBe(true);
  });

  it("names the file when its footer cannot be read", async () => {
    const expected = (reason: string) =>
      `cut.parquet: the Parquet footer cannot be read (${reason}) (expected a complete Parquet file)`;
    const cut = typedBytes.slice(0, typedBytes.length - 100);
    await expect(readParquetLayout(bufferOf(cut), "cut.parquet")).rejects.toThrow(
      AnalysisInputError,
    );
    await expect(readParquetLayout(bufferOf(cut), "cut.parquet")).rejects.toThrow(
      /^cut\.parquet: the Parquet footer cannot be read \(.+\) \(expected a complete Parquet file\)$/,
    );
    const refusing: AsyncBuffer = {
      byteLength: typedBytes.byteLength,
      slice: () => Promise.reject("not an Error"),
    };
    await expect(readParquetLayout(refusing, "cut.parquet")).rejects.toThrow(
      expected("unknown problem"),
    );
  });

  it("refuses a column name given twice, as a CSV header", async () => {
    const twice = writeParquet(
      [optional("a", { type: "DOUBLE" }), optional(" a ", { type: "DOUBLE" })],
      { a: [1], " a ": [2] },
      1,
    );
    await expect(readParquetLayout(bufferOf(twice), "twice.parquet")).rejects.toThrow(
      /^twice\.parquet.*"a"/,
    );
  });
});

describe("a Parquet value as a CSV's text", () => {
  it("gives every type the text a CSV of the table holds, row by row and group by group", async () => {
    const layout = await readParquetLayout(typedFile, "typed.parquet");
    const { rows, indices, progress } = await readAllRows(typedFile, layout);
    expect(indices).toEqual([0, 1, 2, 3, 4]);
    // Progress counts each row group's compressed bytes as it is done.
    expect(progress).toEqual([
      layout.groupBytes[0],
      layout.groupBytes[0] + layout.groupBytes[1],
      layout.groupBytes[0] + layout.groupBytes[1] + layout.groupBytes[2],
    ]);
    const column = (name: string) => rows.map((fields) => fields[layout.columns.indexOf(name)]);
    // Missing values are empty fields; text and whole numbers as written (CPython's str of int).
    expect(column("text")).toEqual(["a", "a", "", 'ü, "q"', "a"]);
    expect(column("int32")).toEqual(["1", "-2", "", "2147483647", "5"]);
    expect(column("int8")).toEqual(["1", "-2", "3", "-128", "127"]);
    expect(column("flag")).toEqual(["true", "false", "", "true", "false"]);
    expect(column("time")).toEqual(["1000", "2000", "", "0", "86399999"]);
    const python = runPythonJson<{
      uint64: string[];
      integer: string[];
      timestamp: string[];
      date: string[];
      point: string[];
      roundTrips: boolean[];
    }>(
      `import sys, json, datetime, struct
d = json.load(sys.stdin)
utc = datetime.timezone.utc
def iso(ms):
    return (datetime.datetime(1970, 1, 1, tzinfo=utc) + datetime.timedelta(milliseconds=ms)).isoformat(timespec="milliseconds").replace("+00:00", "Z")
dumps = lambda v: "" if v is None else json.dumps(v, separators=(",", ":"), ensure_ascii=False)
f32 = lambda v: struct.unpack("<f", struct.pack("<f", v))[0]
trips = [float(t) == v for t, v in zip(d["doubleText"], d["doubles"])]
trips += [float(t) == f32(v) for t, v in zip(d["floatText"], d["floats"])]
trips += [float(t) == v for t, v in zip(d["decimalText"], d["decimals"])]
print(json.dumps({
    "uint64": ["" if v is None else str(v) for v in [1, 2, None, 2**64 - 1, 5]],
    "integer": ["" if v is None else str(v) for v in [1, -(2**53) - 1, 3, None, 5]],
    "timestamp": ["" if v is None else iso(v) for v in [1, None, 2, 1583020800001, 0]],
    "date": ["" if v is None else iso((datetime.date.fromisoformat(v) - datetime.date(1970, 1, 1)).days * 86400000) for v in d["days"]],
    "point": [dumps(v) for v in [{"x": "1", "tag": "a"}, None, {"x": str(2**53 + 1), "tag": None}, {"x": "-1", "tag": "b"}, None]],
    "roundTrips": trips}))`,
      {
        days: DAYS,
        doubles: DOUBLES.filter((value) => value !== null),
        doubleText: column("double").filter((field) => field !== ""),
        floats: [0.1, 2, 3.4028234663852886e38, -1.5],
        floatText: column("float").filter((field) => field !== ""),
        decimals: [1.25, -2, 3.5, 0.01],
        decimalText: column("decimal").filter((field) => field !== ""),
      },
    );
    expect(column("uint64")).toEqual(python.uint64);
    expect(column("integer")).toEqual(python.integer);
    expect(column("timestamp")).toEqual(python.timestamp);
    expect(column("date")).toEqual(python.date);
    expect(column("point")).toEqual(python.point);
    expect(python.roundTrips).toHaveLength(12);
    expect(python.roundTrips.every(Boolean)).toBe(true);
    expect(column("double")[3]).toBe("");
  });

  it("writes a non-finite double as text CPython's float() reads back, not as a missing value", () => {
    const fields = [Infinity, -Infinity, NaN].map(toField);
    const parsed = runPythonJson<string[]>(
      `import sys, json
print(json.dumps([repr(float(field)) for field in json.load(sys.stdin)]))`,
      fields,
    );
    expect(parsed).toEqual(["inf", "-inf", "nan"]);
  });

  it("writes JavaScript's own values the same way", () => {
    expect(toField(undefined)).toBe("");
    expect(toField(null)).toBe("");
    expect(toField(12345678901234567890n)).toBe("12345678901234567890");
    expect(toField(new Date(Date.UTC(2001, 8, 9, 1, 46, 40)))).toBe("2001-09-09T01:46:40.000Z");
    expect(toField([1n, "a", null])).toBe('["1","a",null]');
  });
});

describe("the first rows of a Parquet file", () => {
  it("gives the rows the whole file starts with, across row groups, and no more than it has", async () => {
    const layout = await readParquetLayout(typedFile, "typed.parquet");
    const { rows } = await readAllRows(typedFile, layout);
    expect(await readParquetHead(typedFile, layout, "typed.parquet", 0)).toEqual([]);
    expect(await readParquetHead(typedFile, layout, "typed.parquet", 1)).toEqual(rows.slice(0, 1));
    expect(await readParquetHead(typedFile, layout, "typed.parquet", 3)).toEqual(rows.slice(0, 3));
    expect(await readParquetHead(typedFile, layout, "typed.parquet", 100)).toEqual(rows);
  });
});

describe("row groups and parts", () => {
  it("reads a range of row groups, numbering rows as in the whole file", async () => {
    const layout = await readParquetLayout(typedFile, "typed.parquet");
    const { rows } = await readAllRows(typedFile, layout);
    const read: { rowIndex: number; fields: string[] }[] = [];
    const progress: number[] = [];
    await readParquetRowGroups(
      typedFile,
      layout,
      "typed.parquet",
      {
        onRow: (fields, rowIndex) => read.push({ rowIndex, fields: [...fields] }),
        onProgress: (bytes) => progress.push(bytes),
      },
      1,
      3,
    );
    expect(read.map(({ rowIndex }) => rowIndex)).toEqual([2, 3, 4]);
    expect(read.map(({ fields }) => fields)).toEqual(rows.slice(2));
    expect(progress).toEqual([layout.groupBytes[1], layout.groupBytes[1] + layout.groupBytes[2]]);
    // Progress is optional.
    const withoutProgress: string[][] = [];
    await readParquetRowGroups(typedFile, layout, "typed.parquet", {
      onRow: (fields) => withoutProgress.push([...fields]),
    });
    expect(withoutProgress).toEqual(rows);
  });

  it("finds the row groups that begin in a byte range [start, end)", async () => {
    const layout = await readParquetLayout(typedFile, "typed.parquet");
    const [first, second, third] = layout.groupOffsets;
    const size = typedBytes.byteLength;
    expect(findGroupsIn(layout, 0, second)).toEqual({ from: 0, to: 1 });
    expect(findGroupsIn(layout, first, first + 1)).toEqual({ from: 0, to: 1 });
    expect(findGroupsIn(layout, second, size)).toEqual({ from: 1, to: 3 });
    expect(findGroupsIn(layout, second - 1, third)).toEqual({ from: 1, to: 2 });
    expect(findGroupsIn(layout, second + 1, third)).toEqual({ from: 0, to: 0 });
    expect(findGroupsIn(layout, third + 1, size)).toEqual({ from: 0, to: 0 });
  });

  it("cuts a file into parts of whole row groups, about equal in bytes, covering the whole file", async () => {
    const layout = await readParquetLayout(typedFile, "typed.parquet");
    // Row groups of 30, 10, 10 and 10 bytes at 4, 34, 44, 54 in a 100-byte file.
    const made = { ...layout, groupOffsets: [4, 34, 44, 54], groupBytes: [30, 10, 10, 10] };
    // Halves of exactly 30 bytes each: the first group alone, then the others.
    expect(cutParquetIntoParts(made, 100, 2)).toEqual([
      { start: 0, end: 34 },
      { start: 34, end: 100 },
    ]);
    expect(cutParquetIntoParts(made, 100, 1)).toEqual([{ start: 0, end: 100 }]);
    // Never more parts than row groups, each part at least one group.
    expect(cutParquetIntoParts(made, 100, 9)).toEqual([
      { start: 0, end: 34 },
      { start: 34, end: 44 },
      { start: 44, end: 54 },
      { start: 54, end: 100 },
    ]);
    const even = { ...made, groupOffsets: [4, 14, 24, 34], groupBytes: [10, 10, 10, 10] };
    expect(cutParquetIntoParts(even, 100, 2)).toEqual([
      { start: 0, end: 24 },
      { start: 24, end: 100 },
    ]);
    // Six equal row groups in thirds: two groups a part.
    const six = { ...made, groupOffsets: [4, 14, 24, 34, 44, 54], groupBytes: Array(6).fill(10) };
    expect(cutParquetIntoParts(six, 100, 3)).toEqual([
      { start: 0, end: 24 },
      { start: 24, end: 44 },
      { start: 44, end: 100 },
    ]);
    const two = { ...made, groupOffsets: [4, 14], groupBytes: [10, 10] };
    expect(cutParquetIntoParts(two, 100, 2)).toEqual([
      { start: 0, end: 14 },
      { start: 14, end: 100 },
    ]);
    // Not cut: one row group, or row groups out of file order.
    expect(
      cutParquetIntoParts({ ...made, groupOffsets: [4], groupBytes: [60] }, 100, 2),
    ).toBeNull();
    expect(cutParquetIntoParts({ ...made, groupOffsets: [4, 34, 34, 54] }, 100, 2)).toBeNull();
    expect(cutParquetIntoParts({ ...made, groupOffsets: [4, 44, 34, 54] }, 100, 2)).toBeNull();
    // The real file: every row read once over the parts.
    const parts = cutParquetIntoParts(layout, typedBytes.byteLength, 2);
    expect(parts).not.toBeNull();
    const groups = (parts ?? []).map(({ start, end }) => findGroupsIn(layout, start, end));
    expect(groups).toEqual([
      { from: 0, to: 2 },
      { from: 2, to: 3 },
    ]);
  });
});

describe("row groups that cannot be decoded", () => {
  it("names the file and the rows, and passes on an input error of the storage", async () => {
    const lzo = writeParquet([optional("v", { type: "DOUBLE" })], { v: [1.5, 2.5, 3.5] }, 2, {
      codec: "LZO",
    });
    const file = bufferOf(lzo);
    const layout = await readParquetLayout(file, "lzo.parquet");
    const noRows = { onRow: () => undefined };
    await expect(readParquetRowGroups(file, layout, "lzo.parquet", noRows, 1, 2)).rejects.toThrow(
      "lzo.parquet: rows 2–2 cannot be decoded (parquet unsupported compression codec: LZO) (expected a Parquet file of flat columns with a supported compression)",
    );
    await expect(readParquetHead(file, layout, "lzo.parquet", 2)).rejects.toThrow(
      /^lzo\.parquet: rows 0–1 cannot be decoded/,
    );
    const storageError = new AnalysisInputError("the stored file is gone", { file: "s3.parquet" });
    const failing = (reason: unknown): AsyncBuffer => ({
      byteLength: typedBytes.byteLength,
      slice: () => Promise.reject(reason),
    });
    const typedLayout = await readParquetLayout(typedFile, "typed.parquet");
    await expect(
      readParquetRowGroups(failing(storageError), typedLayout, "typed.parquet", noRows),
    ).rejects.toBe(storageError);
    await expect(
      readParquetRowGroups(failing("lost"), typedLayout, "typed.parquet", noRows),
    ).rejects.toThrow("typed.parquet: rows 0–1 cannot be decoded (unknown problem)");
  });
});
