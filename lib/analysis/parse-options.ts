import { z } from "zod";
import {
  analysisOptionsSchema,
  type AnalysisOptions,
  type AnalysisOptionsInput,
} from "../validation/analysis-options";
import { AnalysisInputError } from "./errors";

/**
 * The analysis's options checked and given their defaults; a bad one throws AnalysisInputError
 * naming the option, its value and what it accepts, in words.
 */
export function parseOptions(options: AnalysisOptionsInput): AnalysisOptions {
  const parsed = analysisOptionsSchema.safeParse(options);
  if (parsed.success) return parsed.data;
  const issue = parsed.error.issues[0];
  const option = issue.path.length > 0 ? issue.path.join(".") : undefined;
  const value = issue.path.reduce<unknown>(
    (parent, key) => (parent as Record<PropertyKey, unknown> | undefined)?.[key],
    options,
  );
  throw new AnalysisInputError(value === undefined ? "is missing" : `is ${JSON.stringify(value)}`, {
    option,
    expected: describeExpected(issue),
  });
}

/** What a failed option check accepts, in words (zod's own messages repeat themselves). */
function describeExpected(issue: z.core.$ZodIssue): string {
  switch (issue.code) {
    case "too_small":
      return `${issue.origin === "number" ? "a number" : "at least"} ${issue.inclusive ? "≥" : ">"} ${String(issue.minimum)}${issue.origin === "array" ? " items" : ""}`;
    case "too_big":
      return `${issue.origin === "number" ? "a number" : "at most"} ${issue.inclusive ? "≤" : "<"} ${String(issue.maximum)}${issue.origin === "array" ? " items" : ""}`;
    case "invalid_type":
      return issue.expected === "int" ? "a whole number" : `a ${issue.expected}`;
    case "invalid_value":
      return `one of ${issue.values.map((value) => JSON.stringify(value)).join(", ")}`;
    default:
      return issue.message;
  }
}
