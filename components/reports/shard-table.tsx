import Link from "next/link";
import { formatFigure } from "@/lib/reports/report-view";
import type { PartitionSummary } from "@/lib/analysis";
import { SHARD_ID_HEADING, shardColumnsFor, type ShardTableRow } from "@/lib/reports/shard-table";
import {
  lastShardPage,
  SHARD_PAGE_SIZE,
  shardTableHref,
  sortedBy,
  type ShardSortKey,
  type ShardTableView,
} from "@/lib/reports/shard-table-view";

/**
 * One page of the per-shard table, sorted and filtered on the server: headings and page links are
 * plain links carrying the view in the URL, so they work without script, can be bookmarked, and
 * a report of 100,000 shards sends one page at a time.
 */
export function ShardTable({
  rows,
  view,
  matching,
  total,
  anchor,
  task,
}: {
  rows: ShardTableRow[];
  view: ShardTableView;
  /** Shards that match the filter. */
  matching: number;
  /** Shards in the report. */
  total: number;
  /** Id of the heading the table's links return to. */
  anchor: string;
  /** The report's task: regression's "classes" are label bins. */
  task: PartitionSummary["dataset"]["task"];
}) {
  const columns = shardColumnsFor(task);
  const headings: { key: ShardSortKey; heading: string; description?: string }[] = [
    { key: "shardId", heading: SHARD_ID_HEADING },
    ...columns,
  ];
  const href = (next: ShardTableView) => shardTableHref(next, anchor);
  const last = lastShardPage(matching);
  const first = (view.page - 1) * SHARD_PAGE_SIZE + 1;
  const sortName =
    view.sort === "shardId"
      ? "shard id"
      : (columns.find((column) => column.key === view.sort)?.heading ?? view.sort);
  const direction = view.descending
    ? view.sort === "shardId"
      ? " (reverse order)"
      : " (largest first)"
    : "";
  const ariaSort = (key: ShardSortKey) =>
    view.sort === key ? (view.descending ? "descending" : "ascending") : undefined;
  const arrow = (key: ShardSortKey) => (view.sort === key ? (view.descending ? " ↓" : " ↑") : "");

  return (
    <div className="space-y-3">
      <form method="get" action={`#${anchor}`} className="no-print flex flex-wrap items-end gap-3">
        {view.sort !== "shardId" || view.descending ? (
          <>
            <input type="hidden" name="sort" value={view.sort} />
            <input type="hidden" name="order" value={view.descending ? "desc" : "asc"} />
          </>
        ) : null}
        <div>
          <label htmlFor="shard-filter" className="block text-xs font-medium text-ink-soft">
            Filter shards by id
          </label>
          <input
            id="shard-filter"
            type="search"
            name="shard"
            defaultValue={view.filter}
            placeholder="e.g. north"
            className="mt-1 w-56 rounded-md border border-ink/20 bg-white px-3 py-1.5 text-sm focus:border-indigo focus:ring-2 focus:ring-indigo/30 focus:outline-none"
          />
        </div>
        <button
          type="submit"
          className="rounded-md px-3 py-1.5 text-sm text-ink ring-1 ring-ink/20 hover:bg-paper-deep"
        >
          Filter
        </button>
        <p className="text-xs text-ink-soft" aria-live="polite">
          {view.filter
            ? `${matching.toLocaleString("en-US")} of ${total.toLocaleString("en-US")} shards match`
            : `${total.toLocaleString("en-US")} shards`}
        </p>
      </form>
      <div className="overflow-x-auto rounded-md border border-ink/10 bg-white print:overflow-visible">
        <table className="w-full text-right text-xs tabular-nums">
          <caption className="sr-only">
            Per-shard figures; the column headings sort the table.
          </caption>
          <thead className="bg-paper-deep/60 text-ink">
            <tr>
              {headings.map((column) => (
                <th
                  key={column.key}
                  scope="col"
                  aria-sort={ariaSort(column.key)}
                  className={`px-2 py-1.5 whitespace-nowrap ${column.key === "shardId" ? "text-left" : ""}`}
                >
                  <Link
                    href={href(sortedBy(view, column.key))}
                    scroll={false}
                    title={column.description}
                    className="font-semibold"
                  >
                    {column.heading}
                    {arrow(column.key)}
                  </Link>
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {rows.length === 0 ? (
              <tr>
                <td colSpan={columns.length + 1} className="px-2 py-4 text-center text-ink-soft">
                  {total === 0
                    ? "This report has no shards."
                    : matching === 0
                      ? "No shard id matches the filter."
                      : "This page is past the last shard."}
                </td>
              </tr>
            ) : (
              rows.map((row) => (
                <tr key={row.shardId} className="border-t border-ink/5">
                  <th
                    scope="row"
                    className="max-w-[14rem] truncate px-2 py-1 text-left font-medium"
                    title={row.shardId}
                  >
                    {row.shardId}
                  </th>
                  {columns.map((column) => (
                    <td key={column.key} className="px-2 py-1">
                      {column.key === "rows" || column.key === "classesPresent"
                        ? row[column.key].toLocaleString("en-US")
                        : formatFigure(row[column.key])}
                    </td>
                  ))}
                </tr>
              ))
            )}
          </tbody>
        </table>
      </div>
      {matching > SHARD_PAGE_SIZE ? (
        <nav
          aria-label="Pages of the per-shard table"
          className="flex flex-wrap items-center gap-3 text-xs text-ink-soft"
        >
          <span>
            Shards {first.toLocaleString("en-US")}–
            {Math.min(first + rows.length - 1, matching).toLocaleString("en-US")} of{" "}
            {matching.toLocaleString("en-US")}, sorted by {sortName}
            {direction}; page {view.page.toLocaleString("en-US")} of {last.toLocaleString("en-US")}.
            The CSV download holds every shard.
          </span>
          <span className="no-print flex gap-2">
            {view.page > 1 ? (
              <Link
                href={href({ ...view, page: Math.min(view.page - 1, last) })}
                scroll={false}
                className="rounded px-2 py-1 text-ink ring-1 ring-ink/20 hover:bg-paper-deep"
              >
                Previous page
              </Link>
            ) : null}
            {view.page < last ? (
              <Link
                href={href({ ...view, page: view.page + 1 })}
                scroll={false}
                className="rounded px-2 py-1 text-ink ring-1 ring-ink/20 hover:bg-paper-deep"
              >
                Next page
              </Link>
            ) : null}
          </span>
        </nav>
      ) : null}
    </div>
  );
}
