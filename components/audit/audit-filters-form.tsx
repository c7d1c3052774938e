import Link from "next/link";
import { buttonClasses } from "@/components/ui/button";
import { AUDIT_ACTIONS } from "@/db/schema/reviews";
import { AUDIT_ACTION_LABELS, type AuditFilters } from "@/lib/reviews/audit-filters";

const CONTROL =
  "mt-1 block rounded-md border border-ink/20 bg-white px-3 py-1.5 text-sm text-ink focus:border-indigo focus:ring-2 focus:ring-indigo/30 focus:outline-none";
const LABEL = "block text-xs font-medium text-ink-soft";

/** The audit log's filters as a plain GET form, so a filtered view is a bookmarkable URL. */
export function AuditFiltersForm({
  action,
  filters,
  actors,
}: {
  action: string;
  filters: AuditFilters;
  actors: { id: string; email: string }[];
}) {
  return (
    <form
      method="get"
      action={action}
      role="search"
      aria-label="Filter the audit log"
      className="flex flex-wrap items-end gap-3 rounded-lg border border-ink/10 bg-white p-4"
    >
      <div>
        <label htmlFor="audit-action" className={LABEL}>
          Event
        </label>
        <select
          id="audit-action"
          name="action"
          defaultValue={filters.action ?? ""}
          className={CONTROL}
        >
          <option value="">Any event</option>
          {AUDIT_ACTIONS.map((kind) => (
            <option key={kind} value={kind}>
              {AUDIT_ACTION_LABELS[kind]}
            </option>
          ))}
        </select>
      </div>
      <div>
        <label htmlFor="audit-actor" className={LABEL}>
          By
        </label>
        <select
          id="audit-actor"
          name="actor"
          defaultValue={filters.actor ?? ""}
          className={CONTROL}
        >
          <option value="">Anyone</option>
          {actors.map((actor) => (
            <option key={actor.id} value={actor.id}>
              {actor.email}
            </option>
          ))}
        </select>
      </div>
      <div>
        <label htmlFor="audit-from" className={LABEL}>
          From (UTC)
        </label>
        <input
          id="audit-from"
          name="from"
          type="date"
          defaultValue={filters.from ?? ""}
          className={CONTROL}
        />
      </div>
      <div>
        <label htmlFor="audit-to" className={LABEL}>
          To (UTC)
        </label>
        <input
          id="audit-to"
          name="to"
          type="date"
          defaultValue={filters.to ?? ""}
          className={CONTROL}
        />
      </div>
      <button type="submit" className={buttonClasses("primary")}>
        Apply
      </button>
      <Link href={action} className={buttonClasses("quiet")}>
        Clear
      </Link>
    </form>
  );
}
