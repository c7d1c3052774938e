import { describe, expect, it } from "vitest";
import {
  ColumnAccumulator,
  MAX_ONE_HOT_LEVELS,
  MIN_NUMERIC_SHARE,
} from "@/lib/analysis/column-accumulator";
import type { DecimalMark } from "@/lib/analysis/text-format";
import { runPythonJson } from "./support/run-python";

function accumulate(
  fields: string[],
  { levelLimit = MAX_ONE_HOT_LEVELS, decimalMark = "." as DecimalMark } = {},
) {
  const column = new ColumnAccumulator("x", "data.csv", levelLimit, decimalMark);
  const values = fields.map((field, row) => column.add(field, row));
  return { column, values };
}

/** What the accumulator tells of a column, in one comparable object. */
function stateOf(column: ColumnAccumulator) {
  return {
    missing: column.missingCount,
    numbers: column.numberCount,
    nonNumbers: column.nonNumberCount,
    firstNonNumbers: column.firstNonNumbers,
    hasLevels: column.hasLevels,
    levels: column.hasLevels ? column.levels : null,
    codes: column.hasLevels ? Array.from(column.takeCodes()) : null,
    distinct: column.distinctCount,
  };
}

describe("one column as it streams by (methods.md §1)", () => {
  it("reads numbers as Python's float() does and missing tokens as missing", () => {
    const fields = [
      "1.5",
      " -2 ",
      "+3.25",
      "1e3",
      "-0.000125",
      ".5",
      "7.",
      "12345678901234567890",
      "0012.50",
      "NA",
      " n/a ",
      "NaN",
      "null",
      "None",
      "",
      "  ",
    ];
    const { column, values } = accumulate(fields);
    // Outside reference: Python's float() on the trimmed token (methods.md §1 lists the missing tokens).
    const reference = runPythonJson<(number | null)[]>(
      `import sys, json
missing = {"", "na", "n/a", "nan", "null", "none"}
print(json.dumps([None if f.strip().lower() in missing else float(f.strip()) for f in json.load(sys.stdin)]))`,
      fields,
    );
    expect(values.map((value) => (Number.isNaN(value) ? null : value))).toEqual(reference);
    expect(column.numberCount).toBe(9);
    expect(column.missingCount).toBe(7);
    expect(column.nonNumberCount).toBe(0);
    expect(column.numeric).toBe(true);
    expect(column.hasBadNumbers).toBe(false);
    expect(column.firstNonNumeric).toBeNull();
    // Levels are the tokens as written (trimmed), missing values coded −1.
    expect(column.levels).toEqual([
      "1.5",
      "-2",
      "+3.25",
      "1e3",
      "-0.000125",
      ".5",
      "7.",
      "12345678901234567890",
      "0012.50",
    ]);
    expect(Array.from(column.takeCodes())).toEqual([
      0, 1, 2, 3, 4, 5, 6, 7, 8, -1, -1, -1, -1, -1, -1, -1,
    ]);
  });

  it("counts words, hexadecimal and spelled infinity as not numbers, listing the first five with their rows", () => {
    const fields = ["1", "abc", "Infinity", "-infinity", "0x1F", "0b1", "0o7", "2", "zz", "17,99"];
    const { column, values } = accumulate(fields);
    expect(values.map((value) => (Number.isNaN(value) ? null : value))).toEqual([
      1,
      null,
      null,
      null,
      null,
      null,
      null,
      2,
      null,
      null,
    ]);
    expect(column.numberCount).toBe(2);
    expect(column.nonNumberCount).toBe(8);
    expect(column.numeric).toBe(false);
    expect(column.firstNonNumbers).toEqual([
      { row: 1, token: "abc" },
      { row: 2, token: "Infinity" },
      { row: 3, token: "-infinity" },
      { row: 4, token: "0x1F" },
      { row: 5, token: "0b1" },
    ]);
    expect(column.firstNonNumeric).toEqual({ row: 1, token: "abc" });
    expect(column.levels).toEqual(fields);
  });

  it("rejects a number written too large for a double, naming row and column", () => {
    const { column } = accumulate(["1"]);
    expect(() => column.add(" 1e999 ", 4)).toThrow(
      'data.csv, data row 4 (0-based, header excluded; line 6), column "x": the value "1e999" is too large (expected a finite number (|x| < 1.8e308) or a missing-value token)',
    );
    expect(() => column.add("-2e308", 5)).toThrow('the value "-2e308" is too large');
    // The largest double is fine (Python: float("1.7976931348623157e308") is finite).
    expect(column.add("1.7976931348623157e308", 6)).toBe(Number.MAX_VALUE);
  });

  it("reads a decimal comma when chosen, where a point is then not a number", () => {
    const { column, values } = accumulate(["17,99", "-0,5", "3", "1.5", " 2,25 "], {
      decimalMark: ",",
    });
    expect(values.map((value) => (Number.isNaN(value) ? null : value))).toEqual([
      17.99,
      -0.5,
      3,
      null,
      2.25,
    ]);
    expect(column.nonNumberCount).toBe(1);
  });

  it("is numeric with bad values when at least 95% of its non-missing values are numbers", () => {
    expect(MIN_NUMERIC_SHARE).toBe(0.95);
    // 19 numbers and one word: exactly 95%.
    const atShare = accumulate([...Array.from({ length: 19 }, (_, k) => String(k)), "abc", "NA"]);
    expect(atShare.column.hasBadNumbers).toBe(true);
    expect(atShare.column.numeric).toBe(false);
    // 18 numbers and one word: 94.7%, a text column.
    const below = accumulate([...Array.from({ length: 18 }, (_, k) => String(k)), "abc"]);
    expect(below.column.hasBadNumbers).toBe(false);
    // All numbers: numeric, no bad values.
    expect(accumulate(["1", "2"]).column.hasBadNumbers).toBe(false);
    // Counting the bad values as missing (the user's choice) makes the column numeric.
    expect(atShare.column.countBadNumbersAsMissing()).toBe(1);
    expect(atShare.column.missingCount).toBe(2);
    expect(atShare.column.nonNumberCount).toBe(0);
    expect(atShare.column.numeric).toBe(true);
  });

  it("keeps a dictionary of at most the limit's distinct values, then drops it", () => {
    const within = accumulate(["b", "a", "b", "c", "NA"], { levelLimit: 3 });
    expect(within.column.hasLevels).toBe(true);
    expect(within.column.levels).toEqual(["b", "a", "c"]);
    expect(within.column.distinctCount).toBe(3);
    expect(Array.from(within.column.takeCodes())).toEqual([0, 1, 0, 2, -1]);
    expect(within.column.codeViews().map((view) => Array.from(view))).toEqual([[0, 1, 0, 2, -1]]);
    const beyond = accumulate(["b", "a", "c", "d", "a"], { levelLimit: 3 });
    expect(beyond.column.hasLevels).toBe(false);
    expect(beyond.column.distinctCount).toBe(Infinity);
    expect(beyond.column.levels).toEqual([]);
    expect(() => beyond.column.takeCodes()).toThrow("column x has no level codes");
    // Numbers count as levels too (a numeric label's classes): 1.0 and 1 are distinct tokens. Values
    // after the dictionary is dropped are still read and counted.
    const numbers = accumulate(["1", "1.0", "1", "2", "3", " 4 ", "NA", "w"], { levelLimit: 2 });
    expect(numbers.column.hasLevels).toBe(false);
    expect(numbers.values.slice(0, 6)).toEqual([1, 1, 1, 2, 3, 4]);
    expect(numbers.column.numberCount).toBe(6);
    expect(numbers.column.missingCount).toBe(1);
    expect(numbers.column.nonNumberCount).toBe(1);
    // Releasing a column whose dictionary was dropped has nothing left to let go.
    expect(() => numbers.column.release()).not.toThrow();
  });

  it("merges parts into what the whole column gives, split anywhere (levels in first-appearance order)", () => {
    // 11 distinct values: limits below, at and above that count.
    const fields = ["b", "3", "a", "NA", "x1", "b", "", "c", "2.5", "a", "w", "q", "r", "s", "t"];
    for (const levelLimit of [4, 6, 10, 11, 40]) {
      const whole = accumulate(fields, { levelLimit }).column;
      for (let cut = 0; cut <= fields.length; cut++) {
        for (const second of [cut, Math.min(fields.length, cut + 3)]) {
          const parts = [fields.slice(0, cut), fields.slice(cut, second), fields.slice(second)].map(
            (part, index) => {
              const offset = [0, cut, second][index];
              const column = new ColumnAccumulator("x", "data.csv", levelLimit);
              part.forEach((field, row) => column.add(field, offset + row));
              return column.snapshot();
            },
          );
          const merged = ColumnAccumulator.merge("x", "data.csv", levelLimit, parts);
          expect(stateOf(merged)).toEqual(stateOf(whole));
        }
      }
    }
  });

  it("snapshots plain data, without a dictionary once it was dropped", () => {
    const { column } = accumulate(["a", "b", "1", "NA"], { levelLimit: 8 });
    expect(column.snapshot()).toEqual({
      missingCount: 1,
      numberCount: 1,
      nonNumberCount: 2,
      firstNonNumbers: [
        { row: 0, token: "a" },
        { row: 1, token: "b" },
      ],
      levels: ["a", "b", "1"],
      codes: Int32Array.from([0, 1, 2, -1]),
    });
    const dropped = accumulate(["a", "b", "c"], { levelLimit: 2 }).column.snapshot();
    expect(dropped.levels).toBeNull();
    expect(dropped.codes).toBeNull();
    // Parts listing more than five examples between them keep the first five in file order.
    const parts = [0, 1].map((part) => {
      const column = new ColumnAccumulator("x", "data.csv", 2);
      for (let k = 0; k < 4; k++) column.add(`w${part}${k}`, part * 4 + k);
      return column.snapshot();
    });
    const merged = ColumnAccumulator.merge("x", "data.csv", 2, parts);
    expect(merged.firstNonNumbers.map((example) => example.row)).toEqual([0, 1, 2, 3, 4]);
    expect(merged.nonNumberCount).toBe(8);
    expect(merged.hasLevels).toBe(false);
  });
});
