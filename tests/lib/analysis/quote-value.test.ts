// Values from a user's file quoted back in messages (quote-value.ts). Which characters are escaped is
// checked against CPython's unicodedata (Unicode's own tables): the control characters (category
// Cc), the line and paragraph separators (Zl, Zp) and the bidirectional embeddings, overrides and
// isolates (bidirectional classes LRE, RLE, PDF, LRO, RLO, LRI, RLI, FSI, PDI); how, against
// CPython's repr(), which writes the same escapes.
import { describe, expect, it } from "vitest";
import { MAX_QUOTED_CHARACTERS, quoteValue, showValue } from "@/lib/analysis/quote-value";
import { runPythonJson } from "./support/run-python";

describe("showValue", () => {
  it("escapes exactly Unicode's controls, separators and bidirectional formatting, as repr() writes them", () => {
    // Every code point of the Basic Multilingual Plane outside the surrogates, and a few above it.
    const escapes = runPythonJson<[number, string][]>(
      `import json, unicodedata
BIDI = {"LRE", "RLE", "PDF", "LRO", "RLO", "LRI", "RLI", "FSI", "PDI"}
out = []
for code in list(range(0xD800)) + list(range(0xE000, 0x10000)) + [0x1F600, 0xE0001, 0x10FFFF]:
    c = chr(code)
    if unicodedata.category(c) in ("Cc", "Zl", "Zp") or unicodedata.bidirectional(c) in BIDI:
        # repr() names tab, line feed and carriage return; the product writes every one by number.
        out.append([code, "\\\\x%02x" % code if c in "\\t\\n\\r" else repr(c)[1:-1]])
print(json.dumps(out))`,
    );
    const expected = new Map(escapes);
    const differing: [number, string][] = [];
    const codes = [...Array.from({ length: 0xd800 }, (_, code) => code)];
    for (let code = 0xe000; code < 0x10000; code++) codes.push(code);
    codes.push(0x1f600, 0xe0001, 0x10ffff);
    for (const code of codes) {
      const character = String.fromCodePoint(code);
      const wanted = expected.get(code) ?? character;
      const shown = showValue(character);
      if (shown !== wanted) differing.push([code, shown]);
    }
    expect(expected.size).toBeGreaterThan(65);
    expect(differing).toEqual([]);
  });

  it(`keeps ${MAX_QUOTED_CHARACTERS} code points whole and cuts a longer value with an ellipsis`, () => {
    const atLimit = "😀".repeat(MAX_QUOTED_CHARACTERS);
    expect(showValue(atLimit)).toBe(atLimit);
    expect(showValue(`${atLimit}x`)).toBe(`${atLimit}…`);
    expect(showValue("short")).toBe("short");
    expect(showValue("")).toBe("");
    // The cut counts code points (Python's len), so no surrogate pair is split.
    const mixed = `${"a".repeat(MAX_QUOTED_CHARACTERS - 1)}😀😀`;
    expect(showValue(mixed)).toBe(`${"a".repeat(MAX_QUOTED_CHARACTERS - 1)}😀…`);
  });

  it("escapes after cutting, so a long value of controls still ends at the limit", () => {
    const controls = "\u0007".repeat(MAX_QUOTED_CHARACTERS + 1);
    expect(showValue(controls)).toBe(`${"\\x07".repeat(MAX_QUOTED_CHARACTERS)}…`);
  });
});

describe("quoteValue", () => {
  it("puts the shown value between double quotes", () => {
    expect(quoteValue("Zürich\u001b")).toBe('"Zürich\\x1b"');
    expect(quoteValue("")).toBe('""');
  });
});
