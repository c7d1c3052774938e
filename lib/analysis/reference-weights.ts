import type { ReferenceWeights } from "../validation/analysis-options";
import { BIAS_NAME } from "./design";
import { AnalysisInputError } from "./errors";

/** What given weights must match: the encoded features in order, the classes, and d + 1. */
export interface WeightShape {
  featureNames: string[];
  classes: string[] | null;
  width: number;
}

/**
 * Checks weights the user gave as the reference point (methods.md §2) against the analysis they
 * are for — same features in order, same classes, C (or 1) rows of d + 1 numbers — and returns them
 * row-major as the engine holds W. One check for the analysis of rows and of digests (methods.md §9).
 * Throws AnalysisInputError naming `file` and what was expected.
 */
export function readGivenWeights(
  given: ReferenceWeights,
  shape: WeightShape,
  file = "reference weights",
): Float64Array {
  const rows = shape.classes === null ? 1 : shape.classes.length;
  const sameList = (a: string[] | null, b: string[] | null) =>
    a === b ||
    (a !== null && b !== null && a.length === b.length && a.every((value, i) => value === b[i]));
  if (!sameList(given.features, shape.featureNames)) {
    throw new AnalysisInputError("the reference weights are for other features", {
      file,
      column: "features",
      expected: `the encoded features in order: ${shape.featureNames.join(", ")} (the bias ${BIAS_NAME} is the last weight)`,
    });
  }
  if (!sameList(given.classes, shape.classes)) {
    throw new AnalysisInputError("the reference weights are for other classes", {
      file,
      column: "classes",
      expected: shape.classes ? `classes ${shape.classes.join(", ")}` : "classes null (regression)",
    });
  }
  if (given.weights.length !== rows || given.weights.some((row) => row.length !== shape.width)) {
    throw new AnalysisInputError("the reference weights have the wrong shape", {
      file,
      column: "weights",
      expected: `${rows} rows of ${shape.width} numbers (features, then the bias)`,
    });
  }
  return Float64Array.from(given.weights.flat());
}
