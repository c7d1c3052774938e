// Code-point order (methods.md §1: shards, classes and one-hot levels are ordered by code point),
// checked against CPython, whose str comparison is by code point.
import { describe, expect, it } from "vitest";
import { compareCodePoints, sortByCodePoint } from "@/lib/analysis/code-point-order";
import { runPythonJson } from "./support/run-python";

/** Strings around the places UTF-16 and code-point order part: surrogates, U+FFFF, prefixes. */
const STRINGS = [
  "",
  "a",
  "A",
  "b",
  "B",
  "ab",
  "abc",
  "a\u0000",
  "Z",
  "é",
  "ü",
  "z",
  "\uE000",
  "\uFFFD",
  "\uFFFF",
  "\uFFFFa",
  "\uFFFFb",
  "\u{10000}",
  "\u{1F600}",
  "\u{1F600}a",
  "\u{1F600}b",
  "\u{1F601}",
  "\u{10FFFF}",
  "a\u{1F600}",
  "a\uFFFD",
  "s10",
  "s2",
  "shard 1",
];

describe("code-point order", () => {
  it("sorts as CPython's sorted() does", () => {
    const python = runPythonJson<string[]>(
      "import sys, json\nprint(json.dumps(sorted(json.load(sys.stdin))))",
      STRINGS,
    );
    const input = [...STRINGS].reverse();
    const sorted = sortByCodePoint(input);
    expect(sorted).toEqual(python);
    // A new array: the caller's is left as it was.
    expect(input).toEqual([...STRINGS].reverse());
  });

  it("gives the sign of CPython's comparison for every pair, and 0 only for equal strings", () => {
    const signs = runPythonJson<number[][]>(
      `import sys, json
s = json.load(sys.stdin)
print(json.dumps([[(a > b) - (a < b) for b in s] for a in s]))`,
      STRINGS,
    );
    const actual = STRINGS.map((a) => STRINGS.map((b) => Math.sign(compareCodePoints(a, b))));
    expect(actual).toEqual(signs);
  });
});
