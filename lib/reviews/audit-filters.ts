import { z } from "zod";
import { AUDIT_ACTIONS, type AuditAction } from "@/db/schema/reviews";

export const AUDIT_ACTION_LABELS: Record<AuditAction, string> = {
  "member.invited": "Member invited",
  "member.role-changed": "Role changed",
  "member.removed": "Member removed",
  "review.requested": "Review requested",
  "review.decided": "Review decided",
};

// A calendar day that exists: 2026-02-30 parses (it rolls over into March), so round-trip it.
const day = z
  .string()
  .regex(/^\d{4}-\d{2}-\d{2}$/)
  .refine((value) => {
    const parsed = new Date(`${value}T00:00:00Z`);
    return !Number.isNaN(parsed.getTime()) && parsed.toISOString().slice(0, 10) === value;
  });

// Each filter is read on its own and a bad one is dropped, so a stale bookmark still shows the log.
const fields = {
  action: z.enum(AUDIT_ACTIONS),
  actor: z.string().trim().min(1).max(100),
  from: day,
  to: day,
};

export type AuditFilters = { [Key in keyof typeof fields]?: z.output<(typeof fields)[Key]> };

type SearchParams = Record<string, string | string[] | undefined>;

/** The audit page's filters from its URL query; unknown or invalid values are ignored. */
export function readAuditFilters(searchParams: SearchParams): AuditFilters {
  const filters: Record<string, string> = {};
  for (const [key, schema] of Object.entries(fields)) {
    const raw = searchParams[key];
    const parsed = schema.safeParse(Array.isArray(raw) ? raw[0] : raw);
    if (parsed.success) filters[key] = parsed.data;
  }
  return filters as AuditFilters;
}
