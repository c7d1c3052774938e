// Guessing the form's column roles from a preview. Open data: penguins from the vega-datasets npm
// package (BSD-3), previewed exactly as an upload is; the other headers are written out here.
import { describe, expect, it } from "vitest";
import { readCsvHead, summarizeCsvHead } from "@/lib/uploads/csv-preview";
import { guessColumns } from "@/lib/uploads/guess-columns";
import { loadPenguinsCsv } from "@/tests/lib/analysis/support/open-data";

function preview(csv: string) {
  const bytes = new TextEncoder().encode(csv);
  return summarizeCsvHead(readCsvHead({ bytes, totalBytes: bytes.length, fileName: "data.csv" }));
}

describe("guessColumns", () => {
  it("finds penguins' label and row number, and no shard column (a partition map then)", () => {
    expect(guessColumns(preview(loadPenguinsCsv().csv))).toEqual({
      labelColumn: "Species",
      idColumn: "row",
      shardColumn: "",
    });
  });

  it("reads names in any case and spelling, and takes a shard column when there is one", () => {
    const csv = "Record_ID,pixel 0,pixel 1,Client-ID,Target\n7,0.1,3,a,x\n9,0.5,2,b,y\n";
    expect(guessColumns(preview(csv))).toEqual({
      labelColumn: "Target",
      idColumn: "Record_ID",
      shardColumn: "Client-ID",
    });
  });

  it("falls back on types: a counting column is the id, the last few-valued column the label", () => {
    const csv = "n,width,height,kind\n0,1.5,2,a\n1,2.5,3,b\n2,1.1,4,a\n3,0.2,5,b\n";
    expect(guessColumns(preview(csv))).toEqual({
      labelColumn: "kind",
      idColumn: "n",
      shardColumn: "",
    });
  });

  it("guesses nothing it cannot tell: distinct measurements are neither id nor label", () => {
    const csv = "a,b\n0.5,1.25\n2.5,7.75\n3.5,9.5\n";
    expect(guessColumns(preview(csv))).toEqual({ labelColumn: "", idColumn: "", shardColumn: "" });
  });
});
