import { z } from "zod";

/** A calendar day that exists: 2026-02-30 parses (it rolls over into March), so round-trip it. */
export const calendarDay = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/)
  .refine((value) => {
    const parsed = new Date(`${value}T00:00:00Z`);
    return !Number.isNaN(parsed.getTime()) && parsed.toISOString().slice(0, 10) === value;
  });

export type SearchParams = Record<string, string | string[] | undefined>;

export type UrlFilters<Fields extends Record<string, z.ZodType<string>>> = {
  [Key in keyof Fields]?: z.output<Fields[Key]>;
};

/**
 * A list page's filters from its URL query (bookmarkable). Each filter is read on its own and a
 * bad or unknown one is dropped, so a hand-edited or stale bookmark still shows the list rather
 * than an error.
 */
export function readUrlFilters<Fields extends Record<string, z.ZodType<string>>>(
  fields: Fields,
  searchParams: SearchParams,
): UrlFilters<Fields> {
  const filters: Record<string, string> = {};
  for (const [key, schema] of Object.entries(fields)) {
    const raw = searchParams[key];
    const parsed = schema.safeParse(Array.isArray(raw) ? raw[0] : raw);
    if (parsed.success) filters[key] = parsed.data;
  }
  return filters as UrlFilters<Fields>;
}
