// The analysis's options checked (parse-options.ts). The outside rules: methods.md's defaults
// (λ = 1e-3, K = 10, R = 100, b = 32; §7: S = 3 seeds) and the house rule that an option error names
// the option, the value given and what the option takes, in words.
import { describe, expect, it } from "vitest";
import { AnalysisInputError } from "@/lib/analysis";
import { parseOptions } from "@/lib/analysis/parse-options";
import type { AnalysisOptionsInput } from "@/lib/validation/analysis-options";
import { inputErrorOf } from "./support/input-error";

function refusal(options: unknown): AnalysisInputError {
  return inputErrorOf(
    () => parseOptions(options as AnalysisOptionsInput),
    `accepted ${JSON.stringify(options)}`,
  );
}

describe("parseOptions", () => {
  it("fills methods.md's defaults", () => {
    const options = parseOptions({ labelColumn: "y", simulate: {} });
    expect(options).toMatchObject({
      labelColumn: "y",
      lambda: 1e-3,
      localSteps: 10,
      rounds: 100,
      batchSize: 32,
      reference: "optimum",
      simulate: { seeds: 3 },
    });
  });

  it("names the option, the value and what it takes", () => {
    const cases: [unknown, string, string, string][] = [
      [{}, "labelColumn", "is missing", "a string"],
      [{ labelColumn: "" }, "labelColumn", 'is ""', "at least 1 character"],
      [{ labelColumn: "y", batchSize: 0 }, "batchSize", "is 0", "a number > 0"],
      [{ labelColumn: "y", batchSize: 1.5 }, "batchSize", "is 1.5", "a whole number"],
      [{ labelColumn: "y", rounds: "x" }, "rounds", 'is "x"', "a number"],
      [{ labelColumn: "y", badNumbersAsMissing: 1 }, "badNumbersAsMissing", "is 1", "a boolean"],
      [{ labelColumn: "y", features: "x" }, "features", 'is "x"', "an array"],
      [
        { labelColumn: "y", task: "foo" },
        "task",
        'is "foo"',
        'one of "classification", "regression"',
      ],
      [{ labelColumn: "y", features: [] }, "features", "is []", "at least 1 item"],
      [{ labelColumn: "y", features: ["a", ""] }, "features.1", 'is ""', "at least 1 character"],
      [{ labelColumn: "y", simulate: { seeds: 99 } }, "simulate.seeds", "is 99", "a number ≤ 20"],
      [{ labelColumn: "y", simulate: { seeds: 0 } }, "simulate.seeds", "is 0", "a number ≥ 1"],
      [
        { labelColumn: "y", simulate: { seed: 2 ** 32 } },
        "simulate.seed",
        "is 4294967296",
        "a number ≤ 4294967295",
      ],
      [
        { labelColumn: "y", reference: "x" },
        "reference",
        'is "x"',
        'one of "optimum", "zero", an object',
      ],
      [
        { labelColumn: "y", reference: { classes: null, features: [], weights: [] } },
        "reference.weights",
        "is []",
        "at least 1 item",
      ],
      [
        { labelColumn: "y", features: ["a", "a"] },
        "features",
        'is ["a","a"]',
        "a feature column is named twice",
      ],
    ];
    for (const [options, option, problem, expected] of cases) {
      const error = refusal(options);
      expect({
        options,
        option: error.option,
        problem: error.problem,
        expected: error.expected,
      }).toEqual({
        options,
        option,
        problem,
        expected,
      });
    }
  });

  it("names no option when the whole input is wrong", () => {
    const error = refusal(null);
    expect(error.option).toBeUndefined();
    expect(error.problem).toBe("is null");
    expect(error.expected).toBe("an object");
  });
});
