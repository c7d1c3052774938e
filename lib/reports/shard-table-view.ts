import { z } from "zod";
import { readUrlFilters, type SearchParams } from "@/lib/validation/url-filters";
import { SHARD_COLUMNS, type ShardColumnKey } from "./shard-table";

/** A column the per-shard table sorts by: a figure, or the shard id (the summary's order). */
export type ShardSortKey = ShardColumnKey | "shardId";

/**
 * Which page of a report's per-shard table to show, as the report page's URL carries it: a
 * federated report can hold 100,000 shards, so the table is sorted, filtered and cut into pages
 * by the database, and links keep the sort and filter from page to page.
 */
export interface ShardTableView {
  sort: ShardSortKey;
  descending: boolean;
  /** Part of a shard id, matched case-insensitively; empty for every shard. */
  filter: string;
  /** 1-based. */
  page: number;
}

/** Rows per page of the per-shard table: a page of 100 shards is about 60 kB of HTML. */
export const SHARD_PAGE_SIZE = 100;

const SORT_KEYS = ["shardId", ...SHARD_COLUMNS.map((column) => column.key)] as [
  ShardSortKey,
  ...ShardSortKey[],
];

const fields = {
  sort: z.enum(SORT_KEYS),
  order: z.enum(["asc", "desc"]),
  shard: z.string().trim().min(1).max(200),
  page: z.string().regex(/^[1-9]\d{0,6}$/),
};

export const DEFAULT_SHARD_VIEW: ShardTableView = {
  sort: "shardId",
  descending: false,
  filter: "",
  page: 1,
};

/** The table's view from the report page's URL; a bad or missing value falls back to the default. */
export function readShardTableView(searchParams: SearchParams): ShardTableView {
  const read = readUrlFilters(fields, searchParams);
  const sort = read.sort ?? DEFAULT_SHARD_VIEW.sort;
  return {
    sort,
    // A figure is first sorted largest first, the shard id in its own order.
    descending: read.order ? read.order === "desc" : sort !== "shardId",
    filter: read.shard ?? "",
    page: read.page ? Number(read.page) : 1,
  };
}

/** The view a click on a column heading asks for: that column, or the other direction of it. */
export function sortedBy(view: ShardTableView, key: ShardSortKey): ShardTableView {
  return view.sort === key
    ? { ...view, descending: !view.descending, page: 1 }
    : { ...view, sort: key, descending: key !== "shardId", page: 1 };
}

/** The URL query of a view (defaults left out), ending at the table's heading. */
export function shardTableHref(view: ShardTableView, anchor: string): string {
  const query = new URLSearchParams();
  if (view.sort !== DEFAULT_SHARD_VIEW.sort) query.set("sort", view.sort);
  if (view.descending !== (view.sort !== "shardId"))
    query.set("order", view.descending ? "desc" : "asc");
  if (view.filter) query.set("shard", view.filter);
  if (view.page > 1) query.set("page", String(view.page));
  const search = query.toString();
  return `${search ? `?${search}` : "?"}#${anchor}`;
}

/** The last page of `count` shards (page 1 when there are none). */
export function lastShardPage(count: number): number {
  return Math.max(1, Math.ceil(count / SHARD_PAGE_SIZE));
}
