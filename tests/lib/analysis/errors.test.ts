import { describe, expect, it } from "vitest";
import { AnalysisInputError, listFirst } from "@/lib/analysis/errors";

describe("an input problem's message names where it is (file, row, column, option) and what was expected", () => {
  it("puts every known place before the problem and the expectation after it, in that order", () => {
    const error = new AnalysisInputError("not a number", {
      file: "data.csv",
      row: 3,
      column: "mass",
      option: "batchSize",
      expected: "a finite number",
    });
    // Rows are counted as the partition map counts them (0-based, header excluded); line 5 is the
    // file's fifth line: the header, then data rows 0 to 3.
    expect(error.message).toBe(
      'data.csv, data row 3 (0-based, header excluded; line 5), column "mass", option batchSize: ' +
        "not a number (expected a finite number)",
    );
    expect(error).toBeInstanceOf(Error);
    expect(error.name).toBe("AnalysisInputError");
    expect({
      problem: error.problem,
      file: error.file,
      row: error.row,
      column: error.column,
      option: error.option,
      expected: error.expected,
    }).toEqual({
      problem: "not a number",
      file: "data.csv",
      row: 3,
      column: "mass",
      option: "batchSize",
      expected: "a finite number",
    });
  });

  it("states the problem alone when no place is known, and row 0 as line 2", () => {
    expect(new AnalysisInputError("no rows").message).toBe("no rows");
    expect(new AnalysisInputError("empty label", { row: 0 }).message).toBe(
      "data row 0 (0-based, header excluded; line 2): empty label",
    );
    expect(new AnalysisInputError("too small", { option: "rounds", expected: "≥ 1" }).message).toBe(
      "option rounds: too small (expected ≥ 1)",
    );
  });

  it("shows a file name and a column from the user's data with their control characters escaped", () => {
    // A crafted name must not reach a terminal raw (quote-value.ts: ESC becomes \x1b).
    const error = new AnalysisInputError("bad", { file: "a\u001bb.csv", column: "c\u001bd" });
    expect(error.message).toBe('a\\x1bb.csv, column "c\\x1bd": bad');
  });
});

describe("listing the first offenders of a check", () => {
  it("lists at most five, quoting values from the data, and says how many there were in all", () => {
    expect(listFirst(["a", "b"], 2)).toBe('"a", "b"');
    expect(listFirst([1, 2, 3, 4, 5, 6, 7], 7)).toBe("1, 2, 3, 4, 5, … (7 in all)");
    expect(listFirst([1, 2, 3, 4, 5], 5)).toBe("1, 2, 3, 4, 5");
    // The caller may hold only the first offenders and know the total from a count.
    expect(listFirst(["x"], 40)).toBe('"x", … (40 in all)');
    expect(listFirst([1, 2, 3], 3, 2)).toBe("1, 2, … (3 in all)");
  });
});
