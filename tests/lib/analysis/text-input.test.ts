import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import { analyzePartition, type PartitionSummary } from "@/lib/analysis";
import { findInvalidUtf8 } from "@/lib/analysis/decode-text";
import { encodeDesign } from "@/lib/analysis/encode-design";
import { readDataset } from "@/lib/analysis/read-dataset";
import type { CsvFormatChoice } from "@/lib/analysis/text-format";
import { MAX_QUOTED_CHARACTERS, showValue } from "@/lib/analysis/quote-value";
import { readCsvHead } from "@/lib/uploads/csv-preview";
import type { AnalysisOptionsInput } from "@/lib/validation/analysis-options";
import { pythonUtf8ErrorStarts, runPythonJson } from "./support/run-python";

/** Streams bytes in odd-sized pieces, so chunk borders fall inside characters and rows. */
function streamBytes(bytes: Uint8Array, piece = 997): Readable {
  const pieces: Buffer[] = [];
  for (let start = 0; start < bytes.length; start += piece) {
    pieces.push(Buffer.from(bytes.subarray(start, start + piece)));
  }
  return Readable.from(pieces);
}

function analyzeBytes(bytes: Uint8Array, options: AnalysisOptionsInput, piece?: number) {
  return analyzePartition({ data: streamBytes(bytes, piece), dataName: "data.csv", options });
}

/** A shard-column dataset of `rows` rows: x = i, z = i mod 7, label by i mod 3, two shards. */
function datasetLines(rows: number): string[] {
  return [
    "x,z,shard,label",
    ...Array.from(
      { length: rows },
      (_, i) => `${i},${i % 7},${i % 2 ? "s1" : "s2"},${i % 3 ? "yes" : "no"}`,
    ),
  ];
}

const OPTIONS = { labelColumn: "label", shardColumn: "shard" } as const;

/** The encoded design's first feature column (standardized), sorted, as the engine reads `csv`. */
async function readFirstColumn(
  csv: string,
  format: CsvFormatChoice,
  badNumbersAsMissing = false,
): Promise<number[]> {
  const raw = await readDataset(
    streamBytes(Buffer.from(csv)),
    "data.csv",
    { labelColumn: "label", shardColumn: "shard" },
    { partition: null, dropUnassignedRows: false, format },
  );
  const design = encodeDesign(raw, undefined, { badNumbersAsMissing });
  const width = design.x.cols;
  return Array.from({ length: design.x.rows }, (_, i) => design.x.data[i * width]).sort(
    (a, b) => a - b,
  );
}

/** pandas' reading of column x, missing and non-finite values filled with the mean, standardized. */
const PANDAS_STANDARDIZED_X = `import sys, json, io, numpy as np, pandas as pd
args = json.load(sys.stdin)
frame = pd.read_csv(io.StringIO(args["csv"]), sep=args["sep"], decimal=args["decimal"], dtype={"x": str})
x = pd.to_numeric(frame.x.str.replace(args["decimal"], ".", regex=False), errors="coerce")
x = x.replace([np.inf, -np.inf], np.nan)
x = x.fillna(x.mean())
print(json.dumps(sorted(((x - x.mean()) / x.std(ddof=0)).tolist())))`;

describe("text decoding (methods.md §1)", () => {
  it("names the line and byte offset of invalid UTF-8 where Python's strict decoder finds it", async () => {
    const lines = datasetLines(400);
    // A Latin-1 "ü" (0xFC) inside a shard id far enough in to cross several stream chunks.
    lines[300] = lines[300].replace("s1", "Z\u00fcrich");
    const bytes = Buffer.from(lines.join("\n") + "\n", "latin1");
    // Outside reference: CPython's UTF-8 codec reports the first invalid byte's offset.
    const reference = runPythonJson<{ offset: number; line: number }>(
      `import sys, json, base64
data = base64.b64decode(json.load(sys.stdin))
try:
    data.decode("utf-8")
except UnicodeDecodeError as error:
    print(json.dumps({"offset": error.start, "line": data[:error.start].count(b"\\n") + 1}))`,
      bytes.toString("base64"),
    );
    await expect(analyzeBytes(bytes, OPTIONS)).rejects.toThrow(
      `data.csv: the text is not valid UTF-8 on line ${reference.line} (byte offset ${reference.offset} in the file)`,
    );
    // Same place found when the bad byte is the last byte of a chunk or its sequence spans two.
    await expect(analyzeBytes(bytes, OPTIONS, reference.offset + 1)).rejects.toThrow(
      `byte offset ${reference.offset} `,
    );
  });

  it("finds the first ill-formed sequence by the Unicode Standard's table 3-7", () => {
    // Cases checked against Python: bytes(...).decode("utf-8") fails at the same start.
    const cases: [number[], number][] = [
      [[0x5a, 0xfc, 0x72], 1], // Latin-1 ü
      [[0x41, 0xc0, 0xaf], 1], // overlong "/"
      [[0xe2, 0x82, 0xac, 0xed, 0xa0, 0x80], 3], // € then a UTF-16 surrogate
      [[0xf4, 0x90, 0x80, 0x80], 0], // above U+10FFFF
      [[0x61, 0xe2, 0x82], 1], // cut short at the end of the file
    ];
    const reference = pythonUtf8ErrorStarts(cases.map(([bytes]) => bytes));
    expect(cases.map(([bytes]) => findInvalidUtf8(Uint8Array.from(bytes), true))).toEqual(
      reference,
    );
    expect(reference).toEqual(cases.map(([, start]) => start));
  });

  it("reads Windows-1252 and UTF-16 with a byte-order mark when chosen, as Python's codecs decode them", async () => {
    const lines = datasetLines(40).map((line) => line.replace("s1", "Z\u00fcrich \u20ac"));
    const text = lines.join("\r\n") + "\r\n";
    const cp1252 = Buffer.from(
      runPythonJson<string>(
        `import sys, json, base64
print(json.dumps(base64.b64encode(json.load(sys.stdin).encode("cp1252")).decode()))`,
        text,
      ),
      "base64",
    );
    const summary = await analyzeBytes(cp1252, { ...OPTIONS, encoding: "windows-1252" });
    // Code-point order: "Z" (U+005A) before "s" (U+0073).
    expect(summary.shards.map((shard) => shard.id)).toEqual(["Z\u00fcrich \u20ac", "s2"]);
    expect(summary.preprocessing.format?.encoding).toBe("windows-1252");

    const utf16 = Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(text, "utf16le")]);
    const fromUtf16 = await analyzeBytes(utf16, { ...OPTIONS, encoding: "utf-16" });
    expect(fromUtf16.shards.map((shard) => shard.id)).toEqual(summary.shards.map((s) => s.id));
    await expect(analyzeBytes(utf16, OPTIONS)).rejects.toThrow(
      /not a text CSV: UTF-16 text \(it starts with a UTF-16 byte-order mark; choose the encoding utf-16\)/,
    );
    await expect(
      analyzeBytes(Buffer.from(text, "utf16le"), { ...OPTIONS, encoding: "utf-16" }),
    ).rejects.toThrow(/does not start with a UTF-16 byte-order mark/);
    await expect(analyzeBytes(Buffer.from(text, "utf16le"), OPTIONS)).rejects.toThrow(
      /not a text CSV: UTF-16 text without a byte-order mark/,
    );
  });

  it("says what a file that is not text looks like instead of looking for its columns", async () => {
    const zipHead = Buffer.concat([Buffer.from("PK\u0003\u0004", "latin1"), Buffer.alloc(40, 1)]);
    await expect(analyzeBytes(zipHead, OPTIONS)).rejects.toThrow(/not a text CSV: a ZIP archive/);
    // An image: NUL bytes early on, no text signature.
    const png = Buffer.from("89504e470d0a1a0a0000000d49484452", "hex");
    await expect(analyzeBytes(png, OPTIONS)).rejects.toThrow(/not a text CSV: binary data/);
  });

  it("rejects a NUL byte anywhere by one rule, on the command line's path and the web preview's", async () => {
    const lines = datasetLines(30);
    lines[25] = lines[25].replace("s2", "s\u00002").replace("s1", "s\u00001");
    const bytes = Buffer.from(lines.join("\n") + "\n");
    // A NUL past the first chunk: the engine names its line (the header is line 1).
    await expect(analyzeBytes(bytes, OPTIONS, 64)).rejects.toThrow(
      "data.csv: the text holds a NUL character on line 26",
    );
    // In the first bytes both the engine and the upload preview refuse it as binary.
    await expect(analyzeBytes(bytes, OPTIONS)).rejects.toThrow(/not a text CSV: binary data/);
    expect(() => readCsvHead({ bytes, totalBytes: bytes.length, fileName: "data.csv" })).toThrow(
      /not a text CSV: binary data/,
    );
  });
});

describe("delimiter and decimal mark (methods.md §1)", () => {
  const semicolonCsv = [
    "x;w;shard;label",
    ...Array.from(
      { length: 30 },
      (_, i) =>
        `${(i * 1.25).toFixed(2).replace(".", ",")};${i % 4};${i % 2 ? "s1" : "s2"};${i % 3 ? "yes" : "no"}`,
    ),
  ].join("\n");

  it("detects ';' and a decimal comma, states them, and reads the numbers pandas reads", async () => {
    const summary = await analyzeBytes(Buffer.from(semicolonCsv), OPTIONS);
    expect(summary.preprocessing.format).toEqual({
      encoding: "utf-8",
      delimiter: ";",
      decimalMark: ",",
    });
    // Outside reference: pandas.read_csv(sep=";", decimal=","), standardized with ddof=0.
    const reference = runPythonJson<number[]>(PANDAS_STANDARDIZED_X, {
      csv: semicolonCsv,
      sep: ";",
      decimal: ",",
    });
    const column = await readFirstColumn(semicolonCsv, {});
    expect(column).toHaveLength(reference.length);
    column.forEach((value, i) => expect(value).toBeCloseTo(reference[i], 12));
    expect(summary.preprocessing.featureNames).toEqual(["x", "w"]);
  });

  it("lets the user override: with a decimal point chosen, '1,25' is a bad value in a numeric column", async () => {
    // Whole numbers but one: detected as a decimal comma; with a point chosen, "7,5" is bad.
    const mostlyWhole = semicolonCsv
      .split("\n")
      .map((line, i) => (i === 0 ? line : line.replace(/^[\d,]+;/, i === 8 ? "7,5;" : `${i};`)))
      .join("\n");
    const detected = await analyzeBytes(Buffer.from(mostlyWhole), OPTIONS);
    expect(detected.preprocessing.format?.decimalMark).toBe(",");
    await expect(
      analyzeBytes(Buffer.from(mostlyWhole), { ...OPTIONS, decimalMark: "." }),
    ).rejects.toThrow(
      /column "x": 1 of the column's 30 values are not numbers .*\("7,5" in data row 7\)/,
    );
    const summary = await analyzeBytes(Buffer.from(semicolonCsv.replaceAll(";", "\t")), {
      ...OPTIONS,
      delimiter: "\t",
    });
    expect(summary.preprocessing.format?.delimiter).toBe("\t");
    expect(summary.preprocessing.format?.decimalMark).toBe(".");
  });
});

describe("numeric columns with bad values (methods.md §1)", () => {
  const lines = datasetLines(60);
  lines[10] = lines[10].replace(/^9,/, "Inf,");
  lines[20] = lines[20].replace(/^19,/, "abc,");
  lines[30] = lines[30].replace(/^29,/, "0x1F,");
  const csv = lines.join("\n") + "\n";

  it("is an error naming the column, how many, and the first rows and values", async () => {
    await expect(analyzeBytes(Buffer.from(csv), OPTIONS)).rejects.toThrow(
      'data.csv, data row 9 (0-based, header excluded; line 11), column "x": 3 of the column\'s 60 values are not numbers although the rest are ("Inf" in data row 9, "abc" in data row 19, "0x1F" in data row 29)',
    );
  });

  it("counts them as missing when chosen, imputing the mean pandas gives with to_numeric(errors='coerce')", async () => {
    const summary: PartitionSummary = await analyzeBytes(Buffer.from(csv), {
      ...OPTIONS,
      badNumbersAsMissing: true,
    });
    expect(summary.preprocessing.badNumbersCountedMissing).toEqual([{ column: "x", count: 3 }]);
    expect(summary.preprocessing.featureNames).toEqual(["x", "z"]);
    // Outside reference: pandas' to_numeric(errors="coerce") with non-finite values also missing
    // (it reads "Inf" as infinity), the mean filled in and standardized with ddof=0.
    const reference = runPythonJson<number[]>(PANDAS_STANDARDIZED_X, {
      csv,
      sep: ",",
      decimal: ".",
    });
    const column = await readFirstColumn(csv, {}, true);
    column.forEach((value, i) => expect(value).toBeCloseTo(reference[i], 12));
  });

  it("keeps a mostly text column categorical or left out, as before", async () => {
    const text = datasetLines(40).map((line, i) =>
      i === 0 ? line : line.replace(/^\d+,/, `name${i},`),
    );
    const summary = await analyzeBytes(Buffer.from(text.join("\n")), OPTIONS);
    expect(summary.preprocessing.omittedColumns).toContainEqual({
      column: "x",
      reason: "too-many-levels",
    });
  });
});

describe("values quoted back in messages", () => {
  it("escapes control characters and cuts long values", () => {
    expect(showValue("ab\u001b]0;x\u0007")).toBe("ab\\x1b]0;x\\x07");
    expect(showValue("a\u202eb\u0085")).toBe("a\\u202eb\\x85");
    const long = "é".repeat(MAX_QUOTED_CHARACTERS + 5);
    expect(showValue(long)).toBe(`${"é".repeat(MAX_QUOTED_CHARACTERS)}…`);
    expect(showValue("😀".repeat(MAX_QUOTED_CHARACTERS))).toBe("😀".repeat(MAX_QUOTED_CHARACTERS));
  });
});
