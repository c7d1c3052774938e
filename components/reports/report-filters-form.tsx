import Link from "next/link";
import { buttonClasses } from "@/components/ui/button";
import { VERDICTS, type ReportFilters } from "@/lib/reports/report-filters";
import { VERDICT_LABELS } from "@/lib/reports/report-view";

const CONTROL =
  "mt-1 block rounded-md border border-ink/20 bg-white px-3 py-1.5 text-sm text-ink focus:border-indigo focus:ring-2 focus:ring-indigo/30 focus:outline-none";
const LABEL = "block text-xs font-medium text-ink-soft";

/**
 * The list's filters as a plain GET form: the choice lives in the URL, so a filtered list can be
 * bookmarked and shared, and the form works from the keyboard without any script.
 */
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
    <form
      method="get"
      action={action}
      role="search"
      aria-label="Filter reports"
      className="flex flex-wrap items-end gap-3 rounded-lg border border-ink/10 bg-white p-4"
    >
      <div>
        <label htmlFor="filter-q" className={LABEL}>
          Title contains
        </label>
        <input
          id="filter-q"
          name="q"
          type="search"
          defaultValue={filters.q ?? ""}
          maxLength={100}
          className={`${CONTROL} w-56`}
        />
      </div>
      <div>
        <label htmlFor="filter-verdict" className={LABEL}>
          Verdict
        </label>
        <select
          id="filter-verdict"
          name="verdict"
          defaultValue={filters.verdict ?? ""}
          className={CONTROL}
        >
          <option value="">Any verdict</option>
          {VERDICTS.map((verdict) => (
            <option key={verdict} value={verdict}>
              {VERDICT_LABELS[verdict]}
            </option>
          ))}
        </select>
      </div>
      <div>
        <label htmlFor="filter-author" className={LABEL}>
          Author
        </label>
        <select
          id="filter-author"
          name="author"
          defaultValue={filters.author ?? ""}
          className={CONTROL}
        >
          <option value="">Anyone</option>
          {authors.map((author) => (
            <option key={author.id} value={author.id}>
              {author.name}
            </option>
          ))}
        </select>
      </div>
      <div>
        <label htmlFor="filter-from" className={LABEL}>
          From (UTC)
        </label>
        <input
          id="filter-from"
          name="from"
          type="date"
          defaultValue={filters.from ?? ""}
          className={CONTROL}
        />
      </div>
      <div>
        <label htmlFor="filter-to" className={LABEL}>
          To (UTC)
        </label>
        <input
          id="filter-to"
          name="to"
          type="date"
          defaultValue={filters.to ?? ""}
          className={CONTROL}
        />
      </div>
      <div className="flex gap-2">
        <button type="submit" className={buttonClasses("primary")}>
          Apply
        </button>
        <Link href={action} className={buttonClasses("quiet")}>
          Clear
        </Link>
      </div>
    </form>
  );
}
