import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import {
  DECIMAL_MARK_SAMPLE_ROWS,
  detectDecimalMark,
  readCsvStream,
  readHeader,
  type CsvPartOptions,
} from "@/lib/analysis/csv-reader";
import {
  DECIMAL_MARKS,
  DELIMITERS,
  TEXT_ENCODINGS,
  type CsvFormat,
  type CsvFormatChoice,
} from "@/lib/analysis/text-format";
import { runPythonJson } from "./support/run-python";

interface ReadResult {
  header: string[] | null;
  format: CsvFormat | undefined;
  rows: string[][];
  indices: number[];
  count: number;
  progress: number[];
}

/** Yields each piece on an event-loop turn of its own, as a file read in several reads arrives. */
async function* onSeparateTurns(pieces: Buffer[]): AsyncGenerator<Buffer> {
  for (const piece of pieces) {
    yield piece;
    await new Promise((resolve) => setImmediate(resolve));
  }
}

async function readText(
  pieces: string[],
  {
    part,
    choice,
    firstRowIndex,
    separateTurns = false,
  }: {
    part?: CsvPartOptions;
    choice?: CsvFormatChoice;
    firstRowIndex?: number;
    separateTurns?: boolean;
  } = {},
): Promise<ReadResult> {
  const result: ReadResult = {
    header: null,
    format: undefined,
    rows: [],
    indices: [],
    count: 0,
    progress: [],
  };
  const buffers = pieces.map((piece) => Buffer.from(piece, "utf8"));
  result.count = await readCsvStream(
    Readable.from(separateTurns ? onSeparateTurns(buffers) : buffers),
    "data.csv",
    {
      onHeader(columns, format) {
        result.header = columns;
        result.format = format;
      },
      onRow(fields, rowIndex) {
        result.rows.push(fields);
        result.indices.push(rowIndex);
      },
      onProgress(characters) {
        result.progress.push(characters);
      },
    },
    part,
    choice,
    firstRowIndex,
  );
  return result;
}

/**
 * Outside reference: CPython's csv module (RFC 4180 quoting), blank lines skipped, header names
 * trimmed, every field kept as the text it holds. One run for several texts.
 */
function pythonFields(
  texts: { text: string; sep: string }[],
): { header: string[]; rows: string[][] }[] {
  return runPythonJson(
    `import sys, io, csv, json
out = []
for d in json.load(sys.stdin):
    rows = [row for row in csv.reader(io.StringIO(d["text"], newline=""), delimiter=d["sep"]) if row]
    out.append({"header": [name.strip() for name in rows[0]], "rows": rows[1:]})
print(json.dumps(out))`,
    texts,
  );
}

describe("reading CSV text (methods.md §1)", () => {
  it("detects the delimiter and splits quoted fields as Python's csv module does, in any pieces", async () => {
    const texts = [",", ";", "\t"].map((delimiter) => {
      const lines = [
        [" id ", "city", "note", "label"],
        ["1", "Zürich", '"says ""hi"""', "a"],
        ["2", `"Genève${delimiter} Suisse"`, '"two\nlines"', "b"],
        ["", "", "", ""],
        ["3", "Bern", "x", "c"],
      ].map((fields) => fields.join(delimiter));
      // A blank line between rows is skipped.
      const text = `${lines.slice(0, 3).join("\r\n")}\r\n\r\n${lines.slice(3).join("\r\n")}\r\n`;
      return { text, sep: delimiter };
    });
    const references = pythonFields(texts);
    for (const [index, { text, sep }] of texts.entries()) {
      const reference = references[index];
      expect(reference.rows).toHaveLength(4);
      // Pieces arriving together are relayed as one text; pieces arriving on separate event-loop
      // turns (here one per CRLF line end) as several.
      const piecesOf = (size: number) =>
        Array.from({ length: Math.ceil(text.length / size) }, (_, k) =>
          text.slice(k * size, (k + 1) * size),
        );
      const deliveries: [pieces: string[], separateTurns: boolean][] = [
        [[text], false],
        [piecesOf(7), false],
        [text.split(/(?<=\r\n)/), true],
      ];
      for (const [pieces, separateTurns] of deliveries) {
        const read = await readText(pieces, { separateTurns });
        expect(read.header).toEqual(reference.header);
        expect(read.rows).toEqual(reference.rows);
        expect(read.indices).toEqual([0, 1, 2, 3]);
        expect(read.count).toBe(4);
        expect(read.format).toEqual({ encoding: "utf-8", delimiter: sep, decimalMark: "." });
        // Progress counts the characters decoded so far, ending at all of them.
        expect(read.progress.at(-1)).toBe(text.length);
        expect(read.progress).toEqual([...read.progress].sort((a, b) => a - b));
      }
    }
  });

  it("takes a decimal comma only with semicolons, some comma numbers and no point numbers", () => {
    expect(
      detectDecimalMark(";", [
        ["a", "17,99"],
        ["1", "-,5"],
      ]),
    ).toBe(",");
    expect(detectDecimalMark(";", [["+2,5 "]])).toBe(",");
    expect(detectDecimalMark(";", [["17,99"]])).toBe(",");
    expect(detectDecimalMark(";", [[" 17,99 "]])).toBe(",");
    expect(detectDecimalMark(";", [[" 17,99 ", " -12.25 "]])).toBe(".");
    expect(detectDecimalMark(";", [["17,99", "+12.25"]])).toBe(".");
    expect(detectDecimalMark(";", [["17,99", ".5"]])).toBe(".");
    expect(detectDecimalMark(";", [["17,99"], ["1.5"]])).toBe(".");
    expect(detectDecimalMark(";", [["1.5"], ["17,99"]])).toBe(".");
    expect(detectDecimalMark(";", [["17"], ["abc"], ["1,2,3"], ["1,"]])).toBe(".");
    expect(detectDecimalMark(";", [])).toBe(".");
    expect(detectDecimalMark(",", [["17,99"]])).toBe(".");
    expect(detectDecimalMark("\t", [["17,99"]])).toBe(".");
  });

  it("looks at the first 200 data rows for the decimal mark, and follows the user's choices", async () => {
    expect(DECIMAL_MARK_SAMPLE_ROWS).toBe(200);
    const rows = (count: number, value: string) => Array(count).fill(`x;${value}`);
    const late = ["a;b", ...rows(200, "7"), "x;1,5", ""].join("\n");
    expect((await readText([late])).format?.decimalMark).toBe(".");
    const last = ["a;b", ...rows(199, "7"), "x;1,5", ""].join("\n");
    expect((await readText([last])).format?.decimalMark).toBe(",");
    // The header is not a data row: a header "1,5" does not make the mark a comma.
    expect((await readText(["1,5;b\nx;7\n"])).format?.decimalMark).toBe(".");
    const chosen = await readText(["a;b\nx;1.5\n"], {
      choice: { delimiter: ",", decimalMark: "," },
    });
    expect(chosen.header).toEqual(["a;b"]);
    expect(chosen.format).toEqual({ encoding: "utf-8", delimiter: ",", decimalMark: "," });
    const latin = await readText(["a,b\nx,1\n"], { choice: { encoding: "windows-1252" } });
    expect(latin.format?.encoding).toBe("windows-1252");
  });

  it("reads a part of a file with the file's header, delimiter and row numbering", async () => {
    const part: CsvPartOptions = {
      header: ["a", "b"],
      delimiter: ";",
      firstRowIndex: 100,
      startByte: 4096,
    };
    const read = await readText(["1;2\n3;4\n"], { part, choice: { encoding: "utf-16" } });
    expect(read.header).toBeNull();
    expect(read.rows).toEqual([
      ["1", "2"],
      ["3", "4"],
    ]);
    expect(read.indices).toEqual([100, 101]);
    expect(read.count).toBe(2);
    await expect(readText(["1;2\n3\n"], { part })).rejects.toThrow(
      "data.csv, data row 101 (0-based, header excluded; line 103): the row has 1 fields (expected 2 fields, like the header)",
    );
    await expect(readText(['1;"2\n'], { part })).rejects.toThrow(
      "data.csv, data row 100 (0-based, header excluded; line 102): a quoted field is not closed",
    );
    await expect(readText(["1;\u00002\n"], { part })).rejects.toThrow(
      "data.csv: the text holds a NUL character (after byte offset 4096 in the file)",
    );
  });

  it("numbers rows from a given index when a part of a file comes with its header", async () => {
    const read = await readText(["a,b\n1,2\n3,4\n"], { firstRowIndex: 50 });
    expect(read.header).toEqual(["a", "b"]);
    expect(read.indices).toEqual([50, 51]);
    expect(read.count).toBe(2);
    await expect(readText(["a,b\n1,2\n3\n"], { firstRowIndex: 50 })).rejects.toThrow(
      "data.csv, data row 51 (0-based, header excluded; line 53): the row has 1 fields",
    );
  });

  it("names the file and row of a short row, an unclosed quote, an empty file and a bad header", async () => {
    await expect(readText(["a,b\n1,2\n3\n"])).rejects.toThrow(
      "data.csv, data row 1 (0-based, header excluded; line 3): the row has 1 fields (expected 2 fields, like the header)",
    );
    await expect(readText(["a,b\n1,2\n3,4,5\n"])).rejects.toThrow("the row has 3 fields");
    await expect(readText(['a,b\n1,2\n3,"4\n5,6\n'])).rejects.toThrow(
      'data.csv, data row 1 (0-based, header excluded; line 3): a quoted field is not closed (expected a closing " before the end of the file)',
    );
    await expect(readText(['a,"b\n1,2\n'])).rejects.toThrow(
      "data.csv, data row 0 (0-based, header excluded; line 2): a quoted field is not closed",
    );
    await expect(readText([""])).rejects.toThrow(
      "data.csv: the file is empty (expected a header row)",
    );
    await expect(readText(["\n\n"])).rejects.toThrow("the file is empty");
    await expect(readText(["a, ,c\n1,2,3\n"])).rejects.toThrow(
      "data.csv: header column 2 has no name (expected a name for every column)",
    );
    await expect(readText(["a,b, a\n1,2,3\n"])).rejects.toThrow(
      'data.csv, column "a": the header names this column twice (expected unique column names)',
    );
    // A problem in the source stream itself is passed on.
    const failing = new Readable({
      read() {
        this.destroy(new Error("disk gone"));
      },
    });
    await expect(readCsvStream(failing, "data.csv", { onHeader() {}, onRow() {} })).rejects.toThrow(
      "disk gone",
    );
  });

  it("stops at the first error a row handler throws and reports it", async () => {
    let seen = 0;
    const text = `a\n${Array.from({ length: 5000 }, (_, k) => k).join("\n")}\n`;
    await expect(
      readCsvStream(Readable.from([text.slice(0, 9000), text.slice(9000)]), "data.csv", {
        onHeader() {},
        onRow(_, rowIndex) {
          seen++;
          if (rowIndex === 3) throw new Error("enough");
        },
      }),
    ).rejects.toThrow("enough");
    expect(seen).toBe(4);
  });

  it("trims header names, the byte-order mark included", () => {
    expect(readHeader(["\ufeffid", " x ", "y\t"], "data.csv")).toEqual(["id", "x", "y"]);
  });
});

describe("the text formats offered (methods.md §1)", () => {
  it("lists UTF-8, Windows-1252 and UTF-16; comma, semicolon and tab; a decimal point or comma", () => {
    expect(TEXT_ENCODINGS).toEqual(["utf-8", "windows-1252", "utf-16"]);
    expect(DELIMITERS).toEqual([",", ";", "\t"]);
    expect(DECIMAL_MARKS).toEqual([".", ","]);
  });
});
