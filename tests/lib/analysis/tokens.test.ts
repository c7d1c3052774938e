// The token rules of methods.md §1 (tokens.ts): which tokens are missing, what counts as a number
// and its value. Values are checked bit for bit against CPython's float() (IEEE 754 correctly rounded
// decimal conversion) and, for a decimal comma, pandas.read_csv(decimal=","); the tokens the
// product reads differently from float() are listed with the rule that decides them.
import { describe, expect, it } from "vitest";
import {
  isMissingToken,
  parseNumberToken,
  parseSimpleDecimal,
  trimToken,
} from "@/lib/analysis/tokens";
import { runPythonJson } from "./support/run-python";

/** The 64 bits of a double as 16 hex digits, so −0, ±Infinity and the last bit all compare. */
function doubleBits(value: number): string {
  const view = new DataView(new ArrayBuffer(8));
  view.setFloat64(0, value);
  return view.getBigUint64(0).toString(16).padStart(16, "0");
}

/** Tokens float() reads and the product does not (see the test that lists why). */
const FLOAT_ONLY_TOKENS = ["inf", "Inf", "nan", "1_000"];

// Tokens where the product and CPython's float() agree, value or rejection.
const AGREED_TOKENS = [
  "17.5",
  "-0",
  "+3",
  "007",
  "0",
  "0.5",
  ".5",
  "5.",
  "-.25",
  "1e3",
  "1E-3",
  "0e5",
  "2.5e+2",
  "1e999",
  "-1e999",
  "1e-400",
  "0.1",
  "123456789012345678901234567890",
  "9007199254740993",
  "0x1F",
  "0X1f",
  "0b101",
  "0B1",
  "0o17",
  "0O7",
  "abc",
  "1,5",
  "1.2.3",
  "--1",
  "1e",
  "e3",
  "+",
];

/** Plain decimals of 15 digits or fewer, then two of 16 and 17. */
const FAST_PATH_TOKENS = [
  "123456789012345",
  "-999999999999999",
  "0.00000000000001",
  "12345678.9012345",
  "+7",
  "-0.0",
  "9.007199254740",
  "1234567890123456",
  "0.0000000000000001",
];

let floatBits: Map<string, string | null> | null = null;

/**
 * CPython's float() of each token as its 64 bits, or null where float() raises ValueError: one
 * Python run for every token of this file (the first call), so each test starts no process of its own.
 */
function pythonFloatBits(tokens: readonly string[]): (string | null)[] {
  if (floatBits === null) {
    const all = [...AGREED_TOKENS, ...FLOAT_ONLY_TOKENS, ...FAST_PATH_TOKENS, "-12.50"];
    const bits = runPythonJson<(string | null)[]>(
      `import sys, json, struct
out = []
for token in json.load(sys.stdin):
    try:
        out.append(struct.pack(">d", float(token)).hex())
    except ValueError:
        out.append(None)
print(json.dumps(out))`,
      all,
    );
    floatBits = new Map(all.map((token, i) => [token, bits[i]]));
  }
  const known = floatBits;
  return tokens.map((token) => {
    const bits = known.get(token);
    if (bits === undefined) throw new Error(`no reference for ${token}`);
    return bits;
  });
}

describe("missing-value tokens (methods.md §1: empty, NA, N/A, NaN, null, None, any case)", () => {
  it("knows each listed token in any case and nothing else", () => {
    const missing = [
      "",
      "NA",
      "na",
      "Na",
      "N/A",
      "n/a",
      "NaN",
      "nan",
      "NAN",
      "null",
      "NULL",
      "None",
      "none",
      "NONE",
    ];
    const present = [
      "0",
      "-",
      "n",
      "N A",
      "NA.",
      "NaNs",
      "nil",
      "nul",
      "nonee",
      "undefined",
      "n/a/",
    ];
    expect(missing.filter((token) => !isMissingToken(token))).toEqual([]);
    expect(present.filter((token) => isMissingToken(token))).toEqual([]);
  });
});

describe("trimming a field (methods.md §1: tokens are read after trimming)", () => {
  it("removes white space and a byte order mark at either end, as String.prototype.trim does", () => {
    // CPython's str.strip() gives the same for these (U+FEFF aside: §1 skips a BOM).
    const cases: [string, string][] = [
      [" 7", "7"],
      ["7 ", "7"],
      ["\t7\r", "7"],
      ["\n NA \n", "NA"],
      ["\uFEFF7", "7"],
      ["7", "7"],
      ["", ""],
      ["a b", "a b"],
    ];
    for (const [token, trimmed] of cases)
      expect({ token, result: trimToken(token) }).toEqual({ token, result: trimmed });
  });
});

describe("number tokens with a decimal point", () => {
  it("reads what CPython's float() reads, to the bit, and rejects what it rejects", () => {
    const expected = pythonFloatBits(AGREED_TOKENS);
    const actual = AGREED_TOKENS.map((token) => {
      const value = parseNumberToken(token);
      return Number.isNaN(value) ? null : doubleBits(value);
    });
    expect(actual.map((bits, i) => [AGREED_TOKENS[i], bits])).toEqual(
      expected.map((bits, i) => [AGREED_TOKENS[i], bits]),
    );
  });

  it("differs from float() only where methods.md §1 or the token's grammar decides otherwise", () => {
    // float() reads "inf", "Inf", "nan" and digit separators; §1 names "Inf" a bad value, and
    // NaN / "nan" are missing-value tokens handled before a number is parsed.
    expect(pythonFloatBits(FLOAT_ONLY_TOKENS).every((bits) => bits !== null)).toBe(true);
    for (const token of FLOAT_ONLY_TOKENS) expect(parseNumberToken(token)).toBeNaN();
    // "Infinity" is JavaScript's spelling of an overflowing number; float() reads it too.
    expect(parseNumberToken("Infinity")).toBe(Number.POSITIVE_INFINITY);
    expect(parseNumberToken("-Infinity")).toBe(Number.NEGATIVE_INFINITY);
  });
});

describe("number tokens with a decimal comma", () => {
  it('reads what pandas.read_csv(decimal=",") reads as a number, and a point is not a number', () => {
    const tokens = ["17,5", "-0,25", "3", ",5", "1e3", "2,5e-1"];
    const pandas = runPythonJson<number[]>(
      `import sys, io, json, pandas as pd
tokens = json.load(sys.stdin)
frame = pd.read_csv(io.StringIO("x\\n" + "\\n".join(tokens) + "\\n"), sep=";", decimal=",")
print(json.dumps([float(v) for v in frame["x"]]))`,
      tokens,
    );
    expect(pandas.every((value) => Number.isFinite(value))).toBe(true);
    expect(tokens.map((token) => parseNumberToken(token, ","))).toEqual(pandas);
    // With a decimal comma, "17.5" is the "17,99 in a dot-decimal file" case of §1 mirrored.
    for (const token of ["17.5", "1.000,5", "0.5"]) expect(parseNumberToken(token, ",")).toBeNaN();
  });
});

describe("plain decimals read on the fast path", () => {
  it("give CPython float()'s bits up to 15 digits and decline 16 or more", () => {
    const bits = pythonFloatBits(FAST_PATH_TOKENS);
    const actual = FAST_PATH_TOKENS.map((token) => {
      const value = parseSimpleDecimal(token);
      return Number.isNaN(value) ? null : doubleBits(value);
    });
    // 16 digits leave the fast path (NaN here; the general parser then reads them).
    expect(actual).toEqual([...bits.slice(0, 7), null, null]);
  });

  it("declines signs without digits, a second point and characters next to the digits", () => {
    for (const token of [
      "",
      "-",
      "+",
      ".",
      "-.",
      "1.2.3",
      "1/2",
      "1:2",
      "1e3",
      "1 ",
      "+-1",
      "0x1",
    ]) {
      expect({ token, value: parseSimpleDecimal(token) }).toEqual({ token, value: Number.NaN });
    }
  });

  it("takes the decimal mark it is given (44, a comma)", () => {
    const [commaFive] = pythonFloatBits(["-12.50"]);
    expect(doubleBits(parseSimpleDecimal("-12,50", 44))).toBe(commaFive);
    expect(parseSimpleDecimal("-12.50", 44)).toBeNaN();
  });
});
