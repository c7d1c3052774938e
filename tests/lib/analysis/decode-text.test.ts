import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import { decodeText, describeNonText, findInvalidUtf8 } from "@/lib/analysis/decode-text";
import type { TextEncodingName } from "@/lib/analysis/text-format";
import { pythonUtf8ErrorStarts, runPythonJson } from "./support/run-python";

/** The stream's bytes in pieces of the given sizes (the last piece takes the rest). */
function piecesOf(bytes: Uint8Array, sizes: number[]): Buffer[] {
  const pieces: Buffer[] = [];
  let start = 0;
  for (const size of sizes) {
    if (start >= bytes.length) break;
    pieces.push(Buffer.from(bytes.subarray(start, start + size)));
    start += size;
  }
  if (start < bytes.length) pieces.push(Buffer.from(bytes.subarray(start)));
  return pieces;
}

async function decodeAll(
  pieces: (Buffer | string)[],
  encoding: TextEncodingName = "utf-8",
  startByte?: number,
): Promise<string[]> {
  const out: string[] = [];
  for await (const text of decodeText(Readable.from(pieces), "data.csv", encoding, startByte)) {
    out.push(text as string);
  }
  return out;
}

/** Outside reference: CPython's strict codecs, decoding the whole file at once. */
function pythonDecode(
  bytes: Uint8Array,
  codec: string,
): { text: string } | { start: number; line: number } {
  return runPythonJson(
    `import sys, json, base64
d = json.load(sys.stdin); data = base64.b64decode(d["bytes"])
try:
    print(json.dumps({"text": data.decode(d["codec"])}))
except UnicodeDecodeError as error:
    print(json.dumps({"start": error.start, "line": data[:error.start].count(b"\\n") + 1}))`,
    { bytes: Buffer.from(bytes).toString("base64"), codec },
  );
}

describe("decodeText against Python's strict codecs (methods.md §1)", () => {
  const text = "id,city,label\n1,Z\u00fcrich \u20ac,\u{1f600}\n2,Gen\u00e8ve,b\n3,Bern,c\n";
  const utf8 = Buffer.from(text, "utf8");

  it("decodes UTF-8 cut inside every multi-byte sequence, skipping the byte-order mark like utf-8-sig", async () => {
    const withBom = Buffer.concat([Buffer.from([0xef, 0xbb, 0xbf]), utf8]);
    const reference = pythonDecode(withBom, "utf-8-sig");
    expect(reference).toEqual({ text });
    for (let size = 1; size <= 5; size++) {
      const pieces = piecesOf(withBom, Array(withBom.length).fill(size));
      expect((await decodeAll(pieces)).join("")).toBe(text);
    }
    // Pieces that split a 4-byte sequence 1 + 3 and 3 + 1 after a short piece.
    const emoji = utf8.indexOf(0xf0);
    for (const cut of [1, 2, 3]) {
      const pieces = piecesOf(utf8, [emoji + cut, 1, 2, 1]);
      expect((await decodeAll(pieces)).join("")).toBe(text);
    }
    // A stream of strings is taken as its UTF-8 bytes; empty pieces give no text.
    expect(await decodeAll([text.slice(0, 10), "", text.slice(10)])).toEqual([
      text.slice(0, 10),
      text.slice(10),
    ]);
  });

  it("names the line and offset of the first invalid byte where Python does, whatever the pieces", async () => {
    // Latin-1 bytes in a UTF-8 file, on line 3, and a sequence cut short at the very end.
    const lines = ["x,label", "1,a", "2,Z\u00fcrich", "3,c"];
    const latin = Buffer.from(lines.join("\n") + "\n", "latin1");
    const reference = pythonDecode(latin, "utf-8") as { start: number; line: number };
    expect(reference.line).toBe(3);
    for (const sizes of [
      [latin.length],
      [5, 5, 5],
      [reference.start],
      [reference.start + 1],
      [1],
    ]) {
      const pieces = piecesOf(latin, Array(40).fill(sizes[0]));
      await expect(decodeAll(pieces)).rejects.toThrow(
        `data.csv: the text is not valid UTF-8 on line ${reference.line} (byte offset ${reference.start} in the file) (expected UTF-8 text, or the file's encoding chosen (windows-1252, utf-16))`,
      );
    }
    const cutShort = Buffer.concat([Buffer.from("x\n1\n2", "utf8"), Buffer.from([0xe2, 0x82])]);
    const atEnd = pythonDecode(cutShort, "utf-8") as { start: number; line: number };
    for (const size of [1, 2, 3, 100]) {
      await expect(decodeAll(piecesOf(cutShort, Array(10).fill(size)))).rejects.toThrow(
        `on line ${atEnd.line} (byte offset ${atEnd.start} in the file)`,
      );
    }
    // A part of a file knows only where it starts: no line, the offset counted from the file's start.
    await expect(decodeAll([latin], "utf-8", 1000)).rejects.toThrow(
      `data.csv: the text is not valid UTF-8 (byte offset ${1000 + reference.start} in the file)`,
    );
  });

  it("finds a sequence cut off mid-file by a plain byte where Python does, the cut falling anywhere", async () => {
    for (const sequence of [
      [0xc3, 0xa9],
      [0xe2, 0x82, 0xac],
      [0xf0, 0x9f, 0x98, 0x80],
    ]) {
      for (let kept = 1; kept < sequence.length; kept++) {
        const bytes = Uint8Array.from([
          ...Buffer.from("id,x\n1,ab\n2,"),
          ...sequence.slice(0, kept),
          ...Buffer.from("Z\n3,c\n"),
        ]);
        const reference = pythonDecode(bytes, "utf-8") as { start: number; line: number };
        for (const size of [1, 2, 3, 4, 5, 7]) {
          await expect(decodeAll(piecesOf(bytes, Array(bytes.length).fill(size)))).rejects.toThrow(
            `on line ${reference.line} (byte offset ${reference.start} in the file)`,
          );
        }
      }
    }
  });

  it("reads Windows-1252 as Python's cp1252 codec does", async () => {
    const bytes = Uint8Array.from([0x80, 0x2c, 0xe9, 0x0a, 0x9c, 0x2c, 0xfc, 0x0a]);
    const reference = pythonDecode(bytes, "cp1252") as { text: string };
    expect((await decodeAll(piecesOf(bytes, [3, 1]), "windows-1252")).join("")).toBe(
      reference.text,
    );
  });

  it("reads UTF-16 in the byte order its byte-order mark names, as Python's utf-16 codec does", async () => {
    for (const [mark, order] of [
      [[0xff, 0xfe], "utf16le"],
      [[0xfe, 0xff], "utf16be"],
    ] as const) {
      const body =
        order === "utf16le" ? Buffer.from(text, "utf16le") : Buffer.from(text, "utf16le").swap16();
      const bytes = Buffer.concat([Buffer.from(mark), body]);
      const reference = pythonDecode(bytes, "utf-16") as { text: string };
      expect(reference.text).toBe(text);
      expect((await decodeAll(piecesOf(bytes, Array(200).fill(3)), "utf-16")).join("")).toBe(text);
    }
    // A lone low surrogate after "ab": Python's strict codec refuses it at byte 6. The message names
    // where the piece holding it starts, here the same byte.
    const broken = Buffer.concat([
      Buffer.from([0xff, 0xfe]),
      Buffer.from("ab", "utf16le"),
      Buffer.from([0x00, 0xdc]),
      Buffer.from("\ncd", "utf16le"),
    ]);
    const refused = pythonDecode(broken, "utf-16") as { start: number; line: number };
    expect(refused).toEqual({ start: 6, line: 1 });
    await expect(decodeAll(piecesOf(broken, [2, 4, 8]), "utf-16")).rejects.toThrow(
      `data.csv: the text is not valid UTF-16 on line ${refused.line} (byte offset ${refused.start} in the file) (expected a CSV text file (UTF-8, or the encoding chosen for it))`,
    );
    await expect(decodeAll([Buffer.from(text, "utf16le")], "utf-16")).rejects.toThrow(
      "data.csv: the file does not start with a UTF-16 byte-order mark (expected UTF-16 text that starts with its byte-order mark (FF FE or FE FF), or another encoding)",
    );
  });

  it("names the line of a NUL character past the first piece, and where a part starts", async () => {
    const bytes = Buffer.from("x,label\n1,a\n2,b\n3,c\u0000\n4,d\n", "utf8");
    await expect(decodeAll(piecesOf(bytes, [9, 3]))).rejects.toThrow(
      "data.csv: the text holds a NUL character on line 4 (expected UTF-8 text",
    );
    await expect(decodeAll(piecesOf(bytes, [9, 100]))).rejects.toThrow("NUL character on line 4");
    // A part of a file is not sniffed again (its first bytes are mid-file) and has no line numbers.
    await expect(decodeAll([Buffer.from("1,a\u0000\n")], "utf-8", 512)).rejects.toThrow(
      "data.csv: the text holds a NUL character (after byte offset 512 in the file)",
    );
    expect(await decodeAll([Buffer.from([0x1f, 0x8b, 0x41])], "windows-1252", 7)).toEqual([
      "\u001f\u2039A",
    ]);
    // Nothing at all decodes to nothing.
    expect(await decodeAll([])).toEqual([]);
  });
});

describe("describeNonText: what a file that is not text looks like", () => {
  const bytes = (...values: number[]) => Uint8Array.from(values);

  it("knows gzip, ZIP and Parquet by their signatures (RFC 1952, PKWARE's APPNOTE, Apache Parquet's format spec)", () => {
    expect(describeNonText(bytes(0x1f, 0x8b, 8), "utf-8")).toBe("gzip data");
    expect(describeNonText(bytes(0x1f, 0x8c, 8), "utf-8")).toBeNull();
    expect(describeNonText(bytes(0x50, 0x4b, 3, 4, 0), "utf-16")).toBe(
      "a ZIP archive (an .xlsx or .ods spreadsheet is one)",
    );
    expect(describeNonText(bytes(0x50, 0x4b, 3, 5), "utf-8")).toBeNull();
    expect(describeNonText(bytes(0x50, 0x41, 0x52, 0x31), "utf-8")).toBe("Parquet data");
    expect(describeNonText(bytes(0x50, 0x41, 0x52, 0x32), "utf-8")).toBeNull();
  });

  it("tells UTF-16 by its byte-order mark or by NULs in every other byte, unless UTF-16 is chosen", () => {
    const bom = "UTF-16 text (it starts with a UTF-16 byte-order mark; choose the encoding utf-16)";
    expect(describeNonText(bytes(0xff, 0xfe, 0x41, 0), "utf-8")).toBe(bom);
    expect(describeNonText(bytes(0xfe, 0xff, 0, 0x41), "windows-1252")).toBe(bom);
    expect(describeNonText(bytes(0xff, 0xfe, 0x41, 0), "utf-16")).toBeNull();
    expect(describeNonText(bytes(0xff, 0xff, 0x41), "windows-1252")).toBeNull();
    const noBom =
      "UTF-16 text without a byte-order mark (save it as UTF-8, or as UTF-16 with a byte-order mark)";
    const littleEndian = Buffer.from("x,label\n1,a\n", "utf16le");
    expect(describeNonText(littleEndian, "utf-8")).toBe(noBom);
    expect(describeNonText(Buffer.from(littleEndian).swap16(), "utf-8")).toBe(noBom);
    // Only the first 4096 bytes are looked at: NULs beyond them do not count.
    const longText = Buffer.concat([Buffer.from("ab".repeat(2048)), Buffer.alloc(8000)]);
    expect(describeNonText(longText, "utf-8")).toBe("binary data (it holds NUL bytes)");
    const wideText = Buffer.concat([
      Buffer.from("a".repeat(2048), "utf16le"),
      Buffer.alloc(8, 0x41),
    ]);
    expect(describeNonText(wideText, "utf-8")).toBe(noBom);
  });

  it("takes text with 90% of its other bytes NUL as UTF-16, and fewer as binary data", () => {
    // 20 two-byte units: 18 with a NUL high byte (exactly 90%) are UTF-16; 17 are not.
    const units = (nulHigh: number) =>
      Uint8Array.from({ length: 40 }, (_, i) => (i % 2 === 1 && i < 2 * nulHigh ? 0 : 0x41));
    expect(describeNonText(units(18), "utf-8")).toMatch(/^UTF-16 text without/);
    expect(describeNonText(units(17), "utf-8")).toBe("binary data (it holds NUL bytes)");
    const evenUnits = (nulLow: number) =>
      Uint8Array.from({ length: 40 }, (_, i) => (i % 2 === 0 && i < 2 * nulLow ? 0 : 0x41));
    expect(describeNonText(evenUnits(18), "utf-8")).toMatch(/^UTF-16 text without/);
    expect(describeNonText(evenUnits(17), "utf-8")).toBe("binary data (it holds NUL bytes)");
    expect(describeNonText(bytes(0x41, 0x0a, 0x42), "utf-8")).toBeNull();
    expect(describeNonText(bytes(0x41, 0x42, 0), "utf-8")).toBe("binary data (it holds NUL bytes)");
  });
});

describe("findInvalidUtf8 (the Unicode Standard, table 3-7) against Python", () => {
  it("finds where Python's strict decoder stops, at every lead and continuation boundary", () => {
    const cases: number[][] = [
      [0x41, 0x7f, 0x80],
      [0xc1, 0xbf],
      [0xc2, 0x7f],
      [0xc2, 0x80, 0xdf, 0xbf],
      [0xdf, 0xc0],
      [0xe0, 0x9f, 0x80],
      [0xe0, 0xa0, 0x80],
      [0xe1, 0x80, 0x7f],
      [0xe1, 0xbf, 0xbf, 0xec, 0xbf, 0xc0],
      [0xed, 0x9f, 0xbf],
      [0xed, 0xa0, 0x80],
      [0xee, 0x80, 0x80, 0xef, 0xbf, 0xbf],
      [0xf0, 0x8f, 0x80, 0x80],
      [0xf0, 0x90, 0x80, 0x80],
      [0xf1, 0x80, 0x80, 0xc0],
      [0xf3, 0xbf, 0xbf, 0xbf],
      [0xf4, 0x8f, 0xbf, 0xbf],
      [0xf4, 0x90, 0x80, 0x80],
      [0xf5, 0x80, 0x80, 0x80],
      [0xff],
      [0x41, 0xe2, 0x82],
      [0x41, 0xf0, 0x9f, 0x98],
      [0x41, 0xc3],
    ];
    const reference = pythonUtf8ErrorStarts(cases);
    expect(cases.map((bytes) => findInvalidUtf8(Uint8Array.from(bytes), true))).toEqual(reference);
    // Mid-file, a sequence cut off by the end of the bytes read so far is not (yet) invalid.
    expect(findInvalidUtf8(Uint8Array.from([0x41, 0xe2, 0x82]), false)).toBe(3);
    expect(findInvalidUtf8(Uint8Array.from([0x41, 0xf0, 0x9f, 0x98]), false)).toBe(4);
  });
});
