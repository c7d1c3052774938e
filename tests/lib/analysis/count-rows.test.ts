// The rows counted without parsing (count-rows.ts) — what a part of a file counts before it to number
// its rows as a read of the whole file does — must be the rows papaparse itself yields with empty
// lines skipped (the outside reference: the library the reader parses with), however the bytes are
// cut into chunks.
import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { countRows, RowCounter } from "@/lib/analysis/count-rows";

/**
 * Lines of the kinds the reader meets: rows, empty lines, CRLF ends (an empty line of a CRLF file
 * is a lone carriage return before its line feed), a last line without its line end.
 */
const TEXTS = [
  "1,a\n2,b\n3,c\n",
  "1,a\n2,b\n3,c",
  "1,a\n\n2,b\n\n\n3,c\n\n",
  "1,a\r\n2,b\r\n\r\n3,c\r\n",
  "\n\n1,a\n",
  "x\ny\nz",
  "",
  "\n",
];

/** Data rows papaparse yields for the text (the reader's parse: empty lines skipped). */
function papaparseRows(text: string): number {
  return Papa.parse<string[]>(text, { header: false, skipEmptyLines: true }).data.length;
}

describe("rows counted without parsing", () => {
  it("are the rows papaparse yields, whatever the chunks", () => {
    for (const text of TEXTS) {
      const bytes = new TextEncoder().encode(text);
      const expected = papaparseRows(text);
      for (let size = 1; size <= Math.max(1, bytes.length); size++) {
        const counter = new RowCounter();
        for (let start = 0; start < bytes.length; start += size) {
          counter.add(bytes.subarray(start, start + size));
        }
        expect({ text, size, rows: counter.finish().rows }).toEqual({ text, size, rows: expected });
      }
    }
  });

  it("tells when a quote appears", () => {
    const counter = new RowCounter();
    counter.add(new TextEncoder().encode('1,"a\nb"\n'));
    expect(counter.finish().quoted).toBe(true);
  });

  it("tells of a quote in any chunk, and of none when there is none", () => {
    const bytes = new TextEncoder().encode('1,a\n2,b\n3,"c"\n4,d\n');
    const counter = new RowCounter();
    for (let start = 0; start < bytes.length; start += 4) {
      counter.add(bytes.subarray(start, start + 4));
    }
    expect(counter.finish()).toEqual({ rows: 4, quoted: true });
    const plain = new RowCounter();
    plain.add(new TextEncoder().encode("1,a\n2,b\n"));
    plain.add(new TextEncoder().encode("3,c\n"));
    expect(plain.finish()).toEqual({ rows: 3, quoted: false });
  });

  it("count a stream of chunks as the counter does", async () => {
    const text = "1,a\n\n2,b\r\n3,c";
    async function* chunks() {
      const bytes = new TextEncoder().encode(text);
      for (let start = 0; start < bytes.length; start += 3) yield bytes.subarray(start, start + 3);
    }
    expect(await countRows(chunks())).toEqual({ rows: papaparseRows(text), quoted: false });
  });
});
