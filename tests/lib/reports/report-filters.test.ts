import { describe, expect, it } from "vitest";
import { hasReportFilters, readReportFilters } from "@/lib/reports/report-filters";

describe("readReportFilters", () => {
  it("keeps valid filters from the URL query", () => {
    const filters = readReportFilters({
      verdict: "local-updates",
      q: "  orchards ",
      author: "user-1",
      from: "2026-01-31",
      to: "2026-02-28",
    });
    expect(filters).toEqual({
      verdict: "local-updates",
      q: "orchards",
      author: "user-1",
      from: "2026-01-31",
      to: "2026-02-28",
    });
    expect(hasReportFilters(filters)).toBe(true);
  });

  it("drops what a stale or hand-edited link gets wrong, one filter at a time", () => {
    const filters = readReportFilters({
      verdict: "best",
      q: "",
      from: "2026-02-30",
      to: "yesterday",
      author: ["user-2", "user-3"],
    });
    expect(filters).toEqual({ author: "user-2" });
    expect(hasReportFilters(readReportFilters({}))).toBe(false);
  });
});
