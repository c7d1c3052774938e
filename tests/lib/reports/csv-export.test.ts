import Papa from "papaparse";
import { describe, expect, it } from "vitest";
import { formatShardsCsv, neutralizeSpreadsheetFormula } from "@/lib/reports/csv-export";
import type { ShardTableRow } from "@/lib/reports/shard-table";

function shardRow(shardId: string, rows: number): ShardTableRow {
  return {
    shardId,
    rows,
    tv: 0.37763012181616834,
    hellinger: 0.1,
    js: 1e-12,
    kl: 0.3919967313937546,
    gradNorm2: 123456789.125,
    sigma2: 0.009031,
    loss: 0.02666,
    classesPresent: 2,
    effectiveClasses: 1.7772013016190473,
    featureShift: 0.444,
  };
}

// OWASP, "CSV Injection" (owasp.org/www-community/attacks/CSV_Injection): cells beginning with
// = + - @ tab or carriage return are prefixed with a single quote so spreadsheets treat them as text.
describe("neutralizeSpreadsheetFormula", () => {
  it.each([
    ["=SUM(A1)", "'=SUM(A1)"],
    ["+1", "'+1"],
    ["-1", "'-1"],
    ["@x", "'@x"],
    ["\t=1+1", "'\t=1+1"],
    ["\r=1+1", "'\r=1+1"],
  ])("prefixes %j", (cell, expected) => {
    expect(neutralizeSpreadsheetFormula(cell)).toBe(expected);
  });

  it.each(["Biscoe", "shard-07", "a=b", "1e-3", "", "'quoted"])("leaves %j unchanged", (cell) => {
    expect(neutralizeSpreadsheetFormula(cell)).toBe(cell);
  });
});

describe("formatShardsCsv", () => {
  const rows = [
    shardRow("Biscoe", 168),
    shardRow('=HYPERLINK("http://x.invalid","open")', 3),
    shardRow("north, upper\nvalley", 12),
  ];
  const parsed = Papa.parse<string[]>(formatShardsCsv(rows, "classification"), {
    skipEmptyLines: true,
  }).data;

  it("writes a header of the page table's headings and one row per shard", () => {
    // The headings as the report page's per-shard table shows them (components/reports/shard-table.tsx).
    expect(parsed[0]).toEqual([
      "Shard",
      "Rows",
      "TV",
      "Hellinger",
      "JS",
      "KL",
      "‖gₘ‖²",
      "σₘ²",
      "Fₘ",
      "Classes",
      "Eff. classes",
      "Feature shift",
    ]);
    expect(parsed).toHaveLength(4);
  });

  it("names regression's classes as the label's bins, as the page does (methods.md §4)", () => {
    const [header] = Papa.parse<string[]>(formatShardsCsv(rows, "regression")).data;
    expect(header.slice(9, 11)).toEqual(["Label bins", "Eff. bins"]);
  });

  it("reads back to the same numbers and ids, with formulas neutralized", () => {
    expect(parsed.slice(1).map((row) => row[0])).toEqual([
      "Biscoe",
      `'=HYPERLINK("http://x.invalid","open")`,
      "north, upper\nvalley",
    ]);
    const first = parsed[1];
    expect(Number(first[1])).toBe(168);
    expect(Number(first[2])).toBe(0.37763012181616834);
    expect(Number(first[4])).toBe(1e-12);
    expect(Number(first[6])).toBe(123456789.125);
    expect(Number(first[10])).toBe(1.7772013016190473);
  });

  it("writes only the header for a report without shards", () => {
    expect(formatShardsCsv([], "classification").trim().split(/\r?\n/)).toHaveLength(1);
  });
});
