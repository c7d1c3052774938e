import { z } from "zod";
import {
  calendarDay,
  readUrlFilters,
  type SearchParams,
  type UrlFilters,
} from "@/lib/validation/url-filters";
import type { Verdict } from "@/lib/analysis/browser";

export const VERDICTS = [
  "local-updates",
  "large-minibatch",
  "no-clear-winner",
] as const satisfies readonly Verdict[];

const fields = {
  verdict: z.enum(VERDICTS),
  q: z.string().trim().min(1).max(100),
  author: z.string().trim().min(1).max(100),
  from: calendarDay,
  to: calendarDay,
};

export type ReportFilters = UrlFilters<typeof fields>;

/** The reports list's filters from its URL query (bookmarkable); unknown or invalid values are ignored. */
export function readReportFilters(searchParams: SearchParams): ReportFilters {
  return readUrlFilters(fields, searchParams);
}

export function hasReportFilters(filters: ReportFilters): boolean {
  return Object.values(filters).some((value) => value !== undefined);
}
