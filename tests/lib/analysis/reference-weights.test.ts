// Weights the user gives as the reference point (methods.md §2, "uploaded weights"): one row per class
// (one for regression) of d + 1 numbers over the encoded features in order, the bias last, held
// row-major (NumPy's C order, np.ravel) as the engine holds W.
import { describe, expect, it } from "vitest";
import { AnalysisInputError } from "@/lib/analysis";
import { BIAS_NAME } from "@/lib/analysis/design";
import { readGivenWeights, type WeightShape } from "@/lib/analysis/reference-weights";
import type { ReferenceWeights } from "@/lib/validation/analysis-options";
import { runPythonJson } from "./support/run-python";
import { inputErrorOf } from "./support/input-error";

const CLASSIFICATION: WeightShape = {
  featureNames: ["x", "colour=red"],
  classes: ["a", "b", "c"],
  width: 3,
};
const REGRESSION: WeightShape = { featureNames: ["x"], classes: null, width: 2 };

function refusal(given: ReferenceWeights, shape: WeightShape, file?: string): AnalysisInputError {
  return inputErrorOf(() => readGivenWeights(given, shape, file), "accepted");
}

describe("readGivenWeights", () => {
  it("returns matching weights in NumPy's row-major (C) order", () => {
    const weights = [
      [1, 2, 3],
      [4.5, -5, 6],
      [7, 8, 0.25],
    ];
    const numpy = runPythonJson<number[]>(
      "import sys, json, numpy as np\nprint(json.dumps(np.array(json.load(sys.stdin)).ravel(order='C').tolist()))",
      weights,
    );
    const given = { classes: ["a", "b", "c"], features: ["x", "colour=red"], weights };
    expect(Array.from(readGivenWeights(given, CLASSIFICATION))).toEqual(numpy);
    expect(
      Array.from(
        readGivenWeights({ classes: null, features: ["x"], weights: [[0.5, -1]] }, REGRESSION),
      ),
    ).toEqual([0.5, -1]);
  });

  it("refuses weights for other features, in another order or fewer", () => {
    for (const features of [
      ["colour=red", "x"],
      ["x"],
      ["x", "colour=red", "z"],
      ["x", "colour=blue"],
    ]) {
      const error = refusal(
        { classes: ["a", "b", "c"], features, weights: [[0, 0, 0]] },
        CLASSIFICATION,
      );
      expect(error.problem).toBe("the reference weights are for other features");
      expect(error.column).toBe("features");
      expect(error.file).toBe("reference weights");
      expect(error.expected).toBe(
        `the encoded features in order: x, colour=red (the bias ${BIAS_NAME} is the last weight)`,
      );
    }
  });

  it("refuses weights for other classes, or for the other task", () => {
    const cases: [string[] | null, WeightShape, string][] = [
      [["b", "a", "c"], CLASSIFICATION, "classes a, b, c"],
      [["a", "b"], CLASSIFICATION, "classes a, b, c"],
      [null, CLASSIFICATION, "classes a, b, c"],
      [["a"], REGRESSION, "classes null (regression)"],
    ];
    for (const [classes, shape, expected] of cases) {
      const error = refusal(
        { classes, features: shape.featureNames, weights: [[0, 0, 0]] },
        shape,
        "w.json",
      );
      expect(error.problem).toBe("the reference weights are for other classes");
      expect({ classes, column: error.column, file: error.file, expected: error.expected }).toEqual(
        {
          classes,
          column: "classes",
          file: "w.json",
          expected,
        },
      );
    }
  });

  it("refuses C rows of other than d + 1 numbers", () => {
    const shapes: number[][][] = [
      [
        [1, 2, 3],
        [1, 2, 3],
      ],
      [
        [1, 2, 3],
        [1, 2, 3],
        [1, 2, 3],
        [1, 2, 3],
      ],
      [
        [1, 2, 3],
        [1, 2],
        [1, 2, 3],
      ],
      [
        [1, 2, 3],
        [1, 2, 3],
        [1, 2, 3, 4],
      ],
    ];
    for (const weights of shapes) {
      const error = refusal(
        { classes: ["a", "b", "c"], features: ["x", "colour=red"], weights },
        CLASSIFICATION,
      );
      expect(error.problem).toBe("the reference weights have the wrong shape");
      expect(error.column).toBe("weights");
      expect(error.expected).toBe("3 rows of 3 numbers (features, then the bias)");
    }
    const regression = refusal(
      {
        classes: null,
        features: ["x"],
        weights: [
          [1, 2],
          [1, 2],
        ],
      },
      REGRESSION,
    );
    expect(regression.expected).toBe("1 rows of 2 numbers (features, then the bias)");
  });
});
