// The preview a registration stores, from a file's first bytes. Expected column types and distinct
// counts come from pandas (Debian's python3-pandas via /usr/bin/python3) reading the same CSV with
// methods.md §1's missing tokens, and from the penguins data's documented columns (vega-datasets,
// BSD-3: 3 species, 3 islands, four body measurements, sex).
import { describe, expect, it } from "vitest";
import { AnalysisInputError } from "@/lib/analysis/errors";
import {
  PREVIEW_BYTES,
  PREVIEW_ROWS,
  readCsvHead,
  summarizeCsvHead,
} from "@/lib/uploads/csv-preview";
import { inspectDataset, inspectLayout, inspectWeights } from "@/lib/uploads/inspect-upload";
import { analyzeText } from "@/tests/lib/analysis/support/analyze-text";
import { loadPenguinsCsv } from "@/tests/lib/analysis/support/open-data";
import { runPythonJson } from "@/tests/lib/analysis/support/run-python";

const encode = (text: string) => new TextEncoder().encode(text);
const source = (text: string, fileName = "data.csv") => {
  const bytes = encode(text);
  return { bytes: bytes.subarray(0, PREVIEW_BYTES), totalBytes: bytes.length, fileName };
};

type PandasColumn = { name: string; numeric: boolean; distinct: number; empty: boolean };

/**
 * Column kinds and distinct counts as pandas sees them: fields trimmed, methods.md §1's missing
 * tokens (case-insensitive) dropped, numeric when pandas.to_numeric converts every other value.
 */
function describeWithPandas(csv: string): PandasColumn[] {
  return runPythonJson<PandasColumn[]>(
    `import io, json, sys
import pandas as pd
missing = {"", "na", "n/a", "nan", "null", "none"}
frame = pd.read_csv(io.StringIO(json.load(sys.stdin)), dtype=str, keep_default_na=False)
out = []
for name in frame.columns:
    values = frame[name].str.strip()
    values = values[~values.str.lower().isin(missing)]
    numeric = pd.to_numeric(values, errors="coerce")
    out.append({"name": name, "numeric": bool(len(values) > 0 and numeric.notna().all()),
                "distinct": int(values.nunique()), "empty": bool(len(values) == 0)})
print(json.dumps(out))`,
    csv,
  );
}

function expectedType(column: PandasColumn) {
  return column.empty ? "empty" : column.numeric ? "numeric" : "categorical";
}

describe("dataset preview on the penguins data", () => {
  const { csv, islandMap } = loadPenguinsCsv();

  it("detects the documented column types and pandas' distinct counts", () => {
    const preview = inspectDataset(source(csv, "penguins.csv"));
    expect(preview.truncated).toBe(false);
    const byName = Object.fromEntries(preview.columns.map((column) => [column.name, column]));
    // Documented: three species and three islands; the four measurements are numbers.
    expect(byName.Species).toEqual({ name: "Species", type: "categorical", distinct: 3 });
    expect(byName.Island).toEqual({ name: "Island", type: "categorical", distinct: 3 });
    for (const measure of [
      "Beak Length (mm)",
      "Beak Depth (mm)",
      "Flipper Length (mm)",
      "Body Mass (g)",
    ]) {
      expect(byName[measure].type).toBe("numeric");
    }
    expect(byName.Sex.type).toBe("categorical");
    // Every column, against pandas.
    expect(preview.columns.map(({ name, type, distinct }) => ({ name, type, distinct }))).toEqual(
      describeWithPandas(csv).map((column) => ({
        name: column.name,
        type: expectedType(column),
        distinct: column.distinct,
      })),
    );
  });

  it("keeps the first rows as they are in the file", () => {
    const preview = inspectDataset(source(csv));
    const lines = csv
      .trim()
      .split("\n")
      .slice(1, PREVIEW_ROWS + 1);
    expect(preview.rows).toHaveLength(PREVIEW_ROWS);
    expect(preview.rows.map((row) => row.join(","))).toEqual(lines);
  });

  it("reads only complete lines of a file larger than the preview, and says it is cut", () => {
    const [header, ...body] = csv.trim().split("\n");
    let big = `${header}\n`;
    while (big.length < PREVIEW_BYTES * 2) big += `${body.join("\n")}\n`;
    const preview = inspectDataset(source(big));
    expect(preview.truncated).toBe(true);
    expect(preview.columns.map((column) => column.type)).toEqual(
      inspectDataset(source(csv)).columns.map((column) => column.type),
    );
    const head = readCsvHead(source(big));
    expect(head.rows.every((row) => row.length === head.header.length)).toBe(true);
    // Every complete line within the bytes read, and none beyond them.
    const completeLines = big.slice(0, PREVIEW_BYTES).split("\n").length - 2;
    expect(head.rows).toHaveLength(completeLines);
  });

  it("accepts the island partition map and shows its columns", () => {
    const preview = inspectLayout(source(islandMap, "islands.csv"));
    expect(preview.columns).toEqual([
      { name: "row_id", type: "numeric", distinct: 344 },
      { name: "shard", type: "categorical", distinct: 3 },
    ]);
  });
});

describe("methods.md §1 token rules in the preview", () => {
  it("skips every missing token, case-insensitively, and calls an all-missing column empty", () => {
    const csv = "a,b,c\n1,x,NA\n n/a ,y,null\nNaN,x,None\n2.5e3,NULL,\n";
    const preview = inspectDataset(source(csv));
    expect(preview.columns).toEqual([
      { name: "a", type: "numeric", distinct: 2 },
      { name: "b", type: "categorical", distinct: 2 },
      { name: "c", type: "empty", distinct: 0 },
    ]);
    expect(
      describeWithPandas(csv).map((column) => [column.name, expectedType(column), column.distinct]),
    ).toEqual([
      ["a", "numeric", 2],
      ["b", "categorical", 2],
      ["c", "empty", 0],
    ]);
  });

  it("does not take hexadecimal or infinite values for numbers", () => {
    const preview = inspectDataset(source("h,i,label\n0x1F,1e999,a\n3,4,b\n"));
    expect(preview.columns.map((column) => column.type)).toEqual([
      "categorical",
      "categorical",
      "categorical",
    ]);
  });

  it("detects a semicolon-separated file as the engine does", async () => {
    // Decimal commas in a semicolon file (methods.md §1): the preview and the engine, each reading
    // the same bytes, must find the same columns and both take x as numeric.
    const csv = "x;y;label;part\n1,5;2;a;p\n3;4;b;p\n2,25;1;a;q\n0,5;3;b;q\n";
    const preview = inspectDataset(source(csv));
    expect(preview.columns.map((column) => [column.name, column.type])).toEqual([
      ["x", "numeric"],
      ["y", "numeric"],
      ["label", "categorical"],
      ["part", "categorical"],
    ]);
    const summary = await analyzeText(csv, { labelColumn: "label", shardColumn: "part" });
    expect(summary.preprocessing.format).toMatchObject({ delimiter: ";", decimalMark: "," });
    expect(summary.preprocessing.featureNames).toEqual(["x", "y"]);
    // The preview states the format the engine will detect, for the form to preselect.
    expect(preview.format).toEqual(summary.preprocessing.format);
  });
});

describe("reading options: detected at upload, chosen on the form (methods.md §1)", () => {
  const semicolonCsv = "city;x;label\nZürich;1,5;a\nGenève;2,25;b\nMünchen;0,5;a\n";

  it("detects Windows-1252 where the bytes are not UTF-8, decoding as Python's cp1252 does", () => {
    const bytes = new Uint8Array(Buffer.from(semicolonCsv, "latin1"));
    const head = readCsvHead({ bytes, totalBytes: bytes.length, fileName: "cities.csv" });
    expect(head.format).toEqual({ encoding: "windows-1252", delimiter: ";", decimalMark: "," });
    // Outside reference: Python's cp1252 codec on the same bytes, split at ';'.
    const python = runPythonJson<string[][]>(
      `import json, sys
data = bytes(json.load(sys.stdin)).decode("cp1252")
print(json.dumps([line.split(";") for line in data.splitlines()[1:]]))`,
      [...bytes],
    );
    expect(head.rows).toEqual(python);
    // Told it is UTF-8, the preview refuses it as the engine would, instead of showing U+FFFD.
    expect(() =>
      readCsvHead(
        { bytes, totalBytes: bytes.length, fileName: "cities.csv" },
        { encoding: "utf-8" },
      ),
    ).toThrow("cities.csv: the text is not valid UTF-8");
  });

  it("reads UTF-16 with a byte-order mark as the same table as its UTF-8 text", () => {
    const utf16 = new Uint8Array(
      Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(semicolonCsv, "utf16le")]),
    );
    const head = readCsvHead({ bytes: utf16, totalBytes: utf16.length, fileName: "cities.csv" });
    const utf8 = readCsvHead(source(semicolonCsv, "cities.csv"));
    expect(head.format).toEqual({ ...utf8.format, encoding: "utf-16" });
    expect(head.rows).toEqual(utf8.rows);
    // Cut inside a character and a line: only the complete lines before the cut count.
    const cut = readCsvHead({
      bytes: utf16.subarray(0, 59),
      totalBytes: utf16.length,
      fileName: "c",
    });
    expect(cut.rows).toEqual(utf8.rows.slice(0, 1));
  });

  it("reads in the user's delimiter and decimal mark instead of the detected ones", () => {
    // Split at commas, the header is one column and the decimal commas split the rows: the
    // error the form shows beside the delimiter.
    expect(() => readCsvHead(source(semicolonCsv), { delimiter: "," })).toThrow(
      "the row has 2 fields (expected 1 fields, like the header)",
    );
    // With a decimal point chosen, "1,5" is not a number: x is no longer numeric.
    const pointPreview = summarizeCsvHead(readCsvHead(source(semicolonCsv), { decimalMark: "." }));
    expect(pointPreview.columns.find((column) => column.name === "x")?.type).toBe("categorical");
    expect(pointPreview.format).toEqual({ encoding: "utf-8", delimiter: ";", decimalMark: "." });
  });
});

describe("files the preview refuses, with the reason", () => {
  const refusal = (run: () => unknown) => {
    try {
      run();
    } catch (error) {
      expect(error).toBeInstanceOf(AnalysisInputError);
      return (error as Error).message;
    }
    throw new Error("expected a refusal");
  };

  it("binary content", () => {
    const zip = new Uint8Array([0x50, 0x4b, 0x03, 0x04, 0x14, 0x00, 0x06, 0x00, 0x08, 0x00]);
    expect(
      refusal(() => inspectDataset({ bytes: zip, totalBytes: 10, fileName: "sheet.csv" })),
    ).toMatch(/^sheet\.csv: not a text CSV/);
  });

  it("a file of blank lines, a header without rows, one column only", () => {
    expect(refusal(() => inspectDataset(source("\n\n\n")))).toMatch(/no header row/);
    expect(refusal(() => inspectDataset(source("a,b\n")))).toMatch(/header but no data rows/);
    expect(refusal(() => inspectDataset(source("only\n1\n2\n")))).toMatch(
      /one column only \("only"\)/,
    );
  });

  it("empty and repeated column names", () => {
    expect(refusal(() => inspectDataset(source("a,,c\n1,2,3\n")))).toMatch(
      /header column 2 has no name/,
    );
    expect(refusal(() => inspectDataset(source("a,b,a\n1,2,3\n")))).toMatch(
      /column "a": the header names this column twice/,
    );
  });

  it("a row with the wrong number of fields, by its row and line", () => {
    expect(refusal(() => inspectDataset(source("a,b\n1,2\n3\n")))).toMatch(
      /data row 1 \(0-based, header excluded; line 3\): the row has 1 fields \(expected 2 fields/,
    );
  });

  it("an unclosed quote in a whole file, but not where the bytes read stop", () => {
    expect(refusal(() => inspectDataset(source('a,b\n1,"2\n3,4\n')))).toMatch(
      /quoted field is not closed/,
    );
    const cut = encode('a,b\n1,2\n3,"multi\nline"\n');
    const head = readCsvHead({ bytes: cut.subarray(0, 16), totalBytes: cut.length, fileName: "x" });
    expect(head.rows).toEqual([["1", "2"]]);
  });

  it("a first line longer than the bytes read", () => {
    const long = `${"c".repeat(PREVIEW_BYTES)},d\n1,2\n`;
    expect(refusal(() => inspectDataset(source(long)))).toMatch(/first line is longer than 256 KB/);
  });

  it("a partition map without the row_id,shard header, naming what was found", () => {
    expect(refusal(() => inspectLayout(source("id,part\n0,a\n", "map.csv")))).toBe(
      'map.csv: the header is "id,part" (expected a partition map with the header row_id,shard (row_id: the dataset\'s id or 0-based row number))',
    );
  });
});

describe("reference weights preview", () => {
  it("shows one row per class with the bias last", () => {
    const preview = inspectWeights(
      JSON.stringify({
        classes: ["a", "b"],
        features: ["x", "y"],
        weights: [
          [1, 2, 3],
          [4, 5, 6],
        ],
      }),
      "w.json",
    );
    expect(preview.columns.map((column) => [column.name, column.type])).toEqual([
      ["class", "categorical"],
      ["x", "numeric"],
      ["y", "numeric"],
      ["bias", "numeric"],
    ]);
    expect(preview.rows).toEqual([
      ["a", "1", "2", "3"],
      ["b", "4", "5", "6"],
    ]);
  });

  it("refuses invalid JSON, a wrong shape and rows of the wrong length", () => {
    expect(() => inspectWeights("{not json", "w.json")).toThrow(/w\.json: this is not valid JSON/);
    expect(() => inspectWeights('{"classes":null,"features":["x"]}', "w.json")).toThrow(
      /"weights"/,
    );
    expect(() =>
      inspectWeights('{"classes":["a","b"],"features":["x"],"weights":[[1,2]]}', "w.json"),
    ).toThrow(/"weights" has 1 rows \(expected 2 \(one row per class\)\)/);
    expect(() =>
      inspectWeights('{"classes":null,"features":["x"],"weights":[[1,2,3]]}', "w.json"),
    ).toThrow(/row 0 has 3 numbers \(expected 2: one per feature plus the bias last\)/);
  });
});
