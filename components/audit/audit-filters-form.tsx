import { FilterBar, FilterInput, FilterSelect } from "@/components/ui/filter-bar";
import { AUDIT_ACTION_OPTIONS, type AuditFilters } from "@/lib/reviews/audit-filters";

/** The audit log's filters: event kind, who acted, and a UTC day range. */
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
    <FilterBar action={action} label="Filter the audit log">
      <FilterSelect
        id="audit-action"
        name="action"
        label="Event"
        anyLabel="Any event"
        value={filters.action}
        options={AUDIT_ACTION_OPTIONS}
      />
      <FilterSelect
        id="audit-actor"
        name="actor"
        label="By"
        anyLabel="Anyone"
        value={filters.actor}
        options={actors.map((actor) => ({ value: actor.id, label: actor.email }))}
      />
      <FilterInput
        id="audit-from"
        name="from"
        type="date"
        label="From (UTC)"
        value={filters.from}
      />
      <FilterInput id="audit-to" name="to" type="date" label="To (UTC)" value={filters.to} />
    </FilterBar>
  );
}
