import { z } from "zod";
import type { Verdict } from "@/lib/analysis/advise-plan";

export const VERDICTS = [
  "local-updates",
  "large-minibatch",
  "no-clear-winner",
] as const satisfies readonly Verdict[];

// A calendar day that exists: 2026-02-30 parses (it rolls over into March), so round-trip it.
const day = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/)
  .refine((value) => {
    const parsed = new Date(`${value}T00:00:00Z`);
    return !Number.isNaN(parsed.getTime()) && parsed.toISOString().slice(0, 10) === value;
  });

// Each filter is read on its own and a bad one is dropped, so a hand-edited or stale bookmark
// still shows the list rather than an error.
const fields = {
  verdict: z.enum(VERDICTS),
  q: z.string().trim().min(1).max(100),
  author: z.string().trim().min(1).max(100),
  from: day,
  to: day,
};

export type ReportFilters = { [Key in keyof typeof fields]?: z.output<(typeof fields)[Key]> };

type SearchParams = Record<string, string | string[] | undefined>;

/** The reports list's filters from its URL query (bookmarkable); unknown or invalid values are ignored. */
export function readReportFilters(searchParams: SearchParams): ReportFilters {
  const filters: Record<string, string> = {};
  for (const [key, schema] of Object.entries(fields)) {
    const raw = searchParams[key];
    const parsed = schema.safeParse(Array.isArray(raw) ? raw[0] : raw);
    if (parsed.success) filters[key] = parsed.data;
  }
  return filters as ReportFilters;
}

export function hasReportFilters(filters: ReportFilters): boolean {
  return Object.values(filters).some((value) => value !== undefined);
}
