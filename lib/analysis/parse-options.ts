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
      // A text's or a list's least length (zod's length limits are inclusive).
      return issue.origin === "number"
        ? `a number ${issue.inclusive ? "≥" : ">"} ${String(issue.minimum)}`
        : `at least ${String(issue.minimum)} ${issue.origin === "array" ? "item" : "character"}${Number(issue.minimum) === 1 ? "" : "s"}`;
    case "too_big":
      // Every upper bound of the options is on a number.
      return `a number ${issue.inclusive ? "≤" : "<"} ${String(issue.maximum)}`;
    case "invalid_type":
      return issue.expected === "int" ? "a whole number" : withArticle(issue.expected);
    case "invalid_value":
      return `one of ${listValues(issue.values)}`;
    case "invalid_union":
      // Each alternative's first complaint says what that alternative takes.
      return `one of ${issue.errors
        .map(([first]) =>
          first.code === "invalid_value" ? listValues(first.values) : describeExpected(first),
        )
        .join(", ")}`;
    default:
      return issue.message;
  }
}

function listValues(values: readonly unknown[]): string {
  return values.map((value) => JSON.stringify(value)).join(", ");
}

function withArticle(noun: string): string {
  return `${/^[aeiou]/.test(noun) ? "an" : "a"} ${noun}`;
}
