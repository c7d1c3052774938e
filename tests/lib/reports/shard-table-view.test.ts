import { describe, expect, it } from "vitest";
import {
  DEFAULT_SHARD_VIEW,
  lastShardPage,
  readShardTableView,
  shardTableHref,
  sortedBy,
} from "@/lib/reports/shard-table-view";

describe("the per-shard table's view in the URL", () => {
  it("reads sort, order, filter and page, and drops what is not valid", () => {
    expect(readShardTableView({ sort: "tv", shard: " north ", page: "3" })).toEqual({
      sort: "tv",
      descending: true,
      filter: "north",
      page: 3,
    });
    expect(readShardTableView({ sort: "rows", order: "asc" }).descending).toBe(false);
    expect(readShardTableView({ sort: "summary", page: "0", order: "up" })).toEqual(
      DEFAULT_SHARD_VIEW,
    );
    expect(readShardTableView({ page: "-2" }).page).toBe(1);
  });

  it("sorts a new column largest first and flips the same column, back on page 1", () => {
    const onPage4 = { ...DEFAULT_SHARD_VIEW, page: 4 };
    const byTv = sortedBy(onPage4, "tv");
    expect(byTv).toEqual({ sort: "tv", descending: true, filter: "", page: 1 });
    expect(sortedBy(byTv, "tv").descending).toBe(false);
    expect(sortedBy(byTv, "shardId").descending).toBe(false);
  });

  it("writes only what differs from the default, and round-trips", () => {
    expect(shardTableHref(DEFAULT_SHARD_VIEW, "shards")).toBe("?#shards");
    const view = { sort: "kl" as const, descending: false, filter: "a&b", page: 2 };
    const href = shardTableHref(view, "shards");
    expect(href).toBe("?sort=kl&order=asc&shard=a%26b&page=2#shards");
    const query = new URLSearchParams(href.slice(1, href.indexOf("#")));
    expect(readShardTableView(Object.fromEntries(query))).toEqual(view);
  });

  it("counts pages of 100 shards", () => {
    expect([0, 1, 100, 101, 100_000].map(lastShardPage)).toEqual([1, 1, 1, 2, 1000]);
  });
});
