import { z } from "zod";
import {
  calendarDay,
  readUrlFilters,
  type SearchParams,
  type UrlFilters,
} from "@/lib/validation/url-filters";
import { AUDIT_ACTIONS, type AuditAction } from "@/db/schema/reviews";

export const AUDIT_ACTION_LABELS: Record<AuditAction, string> = {
  "member.invited": "Member invited",
  "member.invitation-withdrawn": "Invitation withdrawn",
  "member.role-changed": "Role changed",
  "member.removed": "Member removed",
  "report.referred": "Report referred",
  "report.endorsed": "Layout endorsed",
  "report.returned": "Returned for rework",
  "report.deleted": "Report deleted",
  "comment.edited": "Comment edited",
  "comment.deleted": "Comment deleted",
  "api-token.created": "API token created",
  "api-token.revoked": "API token revoked",
  "client-key.issued": "Client key issued",
  "client-key.revoked": "Client key revoked",
  "federated.roster-closed": "Roster closed",
  "federated.cancelled": "Federated analysis stopped",
};

/** Every kind of audit event with its label, in the log's own order, for the filter's choices. */
export const AUDIT_ACTION_OPTIONS = AUDIT_ACTIONS.map((kind) => ({
  value: kind,
  label: AUDIT_ACTION_LABELS[kind],
}));

const fields = {
  action: z.enum(AUDIT_ACTIONS),
  actor: z.string().trim().min(1).max(100),
  from: calendarDay,
  to: calendarDay,
};

export type AuditFilters = UrlFilters<typeof fields>;

/** The audit page's filters from its URL query; unknown or invalid values are ignored. */
export function readAuditFilters(searchParams: SearchParams): AuditFilters {
  return readUrlFilters(fields, searchParams);
}
