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
      return issue.origin === "number"
        ? `a number ${issue.inclusive ? "≥" : ">"} ${String(issue.minimum)}`
        : `${issue.inclusive ? "at least" : "more than"} ${countOf(issue.minimum, issue.origin)}`;
    case "too_big":
      return issue.origin === "number"
        ? `a number ${issue.inclusive ? "≤" : "<"} ${String(issue.maximum)}`
        : `${issue.inclusive ? "at most" : "fewer than"} ${countOf(issue.maximum, issue.origin)}`;
    case "invalid_type":
      return issue.expected === "int" ? "a whole number" : withArticle(issue.expected);
    case "invalid_value":
      return `one of ${issue.values.map((value) => JSON.stringify(value)).join(", ")}`;
    case "invalid_union":
      // Each alternative's first complaint says what that alternative takes.
      return `one of ${issue.errors
        .map(([first]) =>
          first.code === "invalid_value"
            ? first.values.map((value) => JSON.stringify(value)).join(", ")
            : describeExpected(first),
        )
        .join(", ")}`;
    default:
      return issue.message;
  }
}

/** "1 character", "3 items": the length limit of a text or a list, in words. */
function countOf(limit: number | bigint, origin: string): string {
  const unit = origin === "array" || origin === "set" ? "item" : "character";
  return `${String(limit)} ${unit}${Number(limit) === 1 ? "" : "s"}`;
}

function withArticle(noun: string): string {
  return `${/^[aeiou]/.test(noun) ? "an" : "a"} ${noun}`;
}
