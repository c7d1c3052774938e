import { describe, expect, it } from "vitest";
import { describeDownload, nameExportFile } from "@/lib/reports/export-file-name";

describe("nameExportFile", () => {
  it.each([
    ["Penguins by island", 2, "summary.json", "penguins-by-island-v2.summary.json"],
    ["Vergers de la vallée — été", 1, "shards.csv", "vergers-de-la-vallee-ete-v1.shards.csv"],
    ['=cmd|"/C calc"!A0', 3, "shards.csv", "cmd-c-calc-a0-v3.shards.csv"],
    ["日本語", 1, "summary.json", "report-v1.summary.json"],
    ["x".repeat(200), 1, "summary.json", `${"x".repeat(60)}-v1.summary.json`],
  ])("names %j v%i %s as %s", (title, version, suffix, expected) => {
    expect(nameExportFile(title, version, suffix)).toBe(expected);
  });
});

describe("describeDownload", () => {
  it("asks for an attachment that no shared cache keeps", () => {
    expect(describeDownload("a-v1.shards.csv", "text/csv; charset=utf-8")).toMatchObject({
      "Content-Disposition": 'attachment; filename="a-v1.shards.csv"',
      "Cache-Control": "private, no-store",
    });
  });
});
