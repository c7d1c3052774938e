import { FilterBar, FilterInput, FilterSelect } from "@/components/ui/filter-bar";
import { VERDICTS, type ReportFilters } from "@/lib/reports/report-filters";
import { VERDICT_LABELS } from "@/lib/reports/report-view";

const VERDICT_OPTIONS = VERDICTS.map((verdict) => ({
  value: verdict,
  label: VERDICT_LABELS[verdict],
}));

/** The reports list's filters: title text, verdict, author and a UTC day range. */
export function ReportFiltersForm({
  action,
  filters,
  authors,
}: {
  action: string;
  filters: ReportFilters;
  authors: { id: string; name: string }[];
}) {
  return (
    <FilterBar action={action} label="Filter reports">
      <FilterInput
        id="filter-q"
        name="q"
        type="search"
        label="Title contains"
        value={filters.q}
        className="w-56"
      />
      <FilterSelect
        id="filter-verdict"
        name="verdict"
        label="Verdict"
        anyLabel="Any verdict"
        value={filters.verdict}
        options={VERDICT_OPTIONS}
      />
      <FilterSelect
        id="filter-author"
        name="author"
        label="Author"
        anyLabel="Anyone"
        value={filters.author}
        options={authors.map((author) => ({ value: author.id, label: author.name }))}
      />
      <FilterInput
        id="filter-from"
        name="from"
        type="date"
        label="From (UTC)"
        value={filters.from}
      />
      <FilterInput id="filter-to" name="to" type="date" label="To (UTC)" value={filters.to} />
    </FilterBar>
  );
}
