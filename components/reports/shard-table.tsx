"use client";

import { useId, useMemo, useState } from "react";
import { formatFigure } from "@/lib/reports/report-view";
import { SHARD_COLUMNS, type ShardColumnKey, type ShardTableRow } from "@/lib/reports/shard-table";

type SortKey = ShardColumnKey | "shardId";
type Sort = { key: SortKey; descending: boolean };

const PAGE = 100;

function compareRows(a: ShardTableRow, b: ShardTableRow, key: SortKey): number {
  if (key === "shardId") return a.shardId < b.shardId ? -1 : a.shardId > b.shardId ? 1 : 0;
  // Missing values (NaN stored for a failed figure) sort last either way.
  const left = Number.isFinite(a[key]) ? a[key] : Number.NEGATIVE_INFINITY;
  const right = Number.isFinite(b[key]) ? b[key] : Number.NEGATIVE_INFINITY;
  return left - right;
}

/** The per-shard table: click a heading to sort, type to filter shards by id. */
export function ShardTable({ rows }: { rows: ShardTableRow[] }) {
  const [sort, setSort] = useState<Sort>({ key: "shardId", descending: false });
  const [filter, setFilter] = useState("");
  const [showAll, setShowAll] = useState(false);
  const filterId = useId();
  const visible = useMemo(() => {
    const needle = filter.trim().toLowerCase();
    const matching = needle
      ? rows.filter((row) => row.shardId.toLowerCase().includes(needle))
      : rows;
    const sorted = [...matching].sort((a, b) => compareRows(a, b, sort.key));
    return sort.descending ? sorted.reverse() : sorted;
  }, [rows, filter, sort]);
  const shown = showAll ? visible : visible.slice(0, PAGE);

  const toggleSort = (key: SortKey) =>
    setSort((current) =>
      current.key === key
        ? { key, descending: !current.descending }
        : { key, descending: key !== "shardId" },
    );
  const ariaSort = (key: SortKey) =>
    sort.key === key ? (sort.descending ? "descending" : "ascending") : undefined;
  const arrow = (key: SortKey) => (sort.key === key ? (sort.descending ? " ↓" : " ↑") : "");

  return (
    <div className="space-y-3">
      <div className="no-print flex flex-wrap items-end gap-3">
        <div>
          <label htmlFor={filterId} className="block text-xs font-medium text-ink-soft">
            Filter shards by id
          </label>
          <input
            id={filterId}
            type="search"
            value={filter}
            onChange={(event) => setFilter(event.target.value)}
            placeholder="e.g. north"
            className="mt-1 w-56 rounded-md border border-ink/20 bg-white px-3 py-1.5 text-sm focus:border-indigo focus:ring-2 focus:ring-indigo/30 focus:outline-none"
          />
        </div>
        <p className="text-xs text-ink-soft" aria-live="polite">
          {visible.length === rows.length
            ? `${rows.length} shards`
            : `${visible.length} of ${rows.length} shards match`}
        </p>
      </div>
      <div className="overflow-x-auto rounded-md border border-ink/10 bg-white print:overflow-visible">
        <table className="w-full text-right text-xs tabular-nums">
          <caption className="sr-only">
            Per-shard figures; the column headings sort the table.
          </caption>
          <thead className="bg-paper-deep/60 text-ink">
            <tr>
              <th scope="col" aria-sort={ariaSort("shardId")} className="px-2 py-1.5 text-left">
                <button
                  type="button"
                  onClick={() => toggleSort("shardId")}
                  className="font-semibold"
                >
                  Shard{arrow("shardId")}
                </button>
              </th>
              {SHARD_COLUMNS.map((column) => (
                <th
                  key={column.key}
                  scope="col"
                  aria-sort={ariaSort(column.key)}
                  className="px-2 py-1.5 whitespace-nowrap"
                >
                  <button
                    type="button"
                    onClick={() => toggleSort(column.key)}
                    title={column.description}
                    className="font-semibold"
                  >
                    {column.heading}
                    {arrow(column.key)}
                  </button>
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {shown.length === 0 ? (
              <tr>
                <td
                  colSpan={SHARD_COLUMNS.length + 1}
                  className="px-2 py-4 text-center text-ink-soft"
                >
                  {rows.length === 0
                    ? "This report has no shards."
                    : "No shard id matches the filter."}
                </td>
              </tr>
            ) : (
              shown.map((row) => (
                <tr key={row.shardId} className="border-t border-ink/5">
                  <th
                    scope="row"
                    className="max-w-[14rem] truncate px-2 py-1 text-left font-medium"
                    title={row.shardId}
                  >
                    {row.shardId}
                  </th>
                  {SHARD_COLUMNS.map((column) => (
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
      {visible.length > PAGE ? (
        <div className="flex items-center gap-3 text-xs text-ink-soft">
          <span>
            Showing {shown.length} of {visible.length}.
          </span>
          <button
            type="button"
            onClick={() => setShowAll((value) => !value)}
            className="no-print rounded px-2 py-1 text-ink ring-1 ring-ink/20 hover:bg-paper-deep"
          >
            {showAll ? `Show the first ${PAGE}` : `Show all ${visible.length}`}
          </button>
        </div>
      ) : null}
    </div>
  );
}
