// One analysis shared by several workers: the file cut into parts at line ends, each part's digests
// (methods.md §9) computed on its own, combined shard by shard — shards span parts here — and merged
// by the coordinator must give the one-process summary to 1e-9 relative (§9's defining identity; the
// one-process analysis is itself checked against scikit-learn elsewhere). The data is scikit-learn's
// bundled digits stacked 23 times (41 331 rows: more than the fit's 2 × 20 000-row subsample, so the
// subsample's rows are placed across parts too), on a dozen of its pixels and a derived category.
import { mkdtempSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { gzipSync } from "node:zlib";
import { describe, expect, it } from "vitest";
import {
  analyzeFromDigests,
  analyzePartition,
  LocalDigestClient,
  localDatasetBytes,
  planDatasetParts,
  PartsConnection,
  readDatasetPart,
} from "@/lib/analysis";
import { loadStackedDigitsCsv } from "../support/open-data";
import { writeCsvAsParquet } from "../support/parquet-table";
import { compareSummaries } from "./support";

/** A dozen pixels (some blanked, so imputed) and the ink category: the fit's work kept small. */
const FEATURES = [
  ...["2_3", "2_4", "3_2", "3_5", "4_2", "4_5", "5_3", "5_4", "6_3", "1_4", "6_5"].map(
    (cell) => `pixel_${cell}`,
  ),
  "ink",
];
const COLUMNS = { labelColumn: "digit", shardColumn: "shard", features: FEATURES };
const PLAN = { localSteps: 10, rounds: 100, batchSize: 32 };

describe("one analysis in parts", () => {
  it("gives the one-process summary to 1e-9 with 4 parts whose shards span parts", async () => {
    const file = path.join(mkdtempSync(path.join(tmpdir(), "partita-parts-")), "digits.csv");
    writeFileSync(file, loadStackedDigitsCsv(23));
    const bytes = await localDatasetBytes(file);
    const plan = await planDatasetParts(bytes, "digits.csv", 4);
    expect(plan.parts).toHaveLength(4);
    const parts = await Promise.all(
      plan.parts.map(
        async (_, index) =>
          new LocalDigestClient(
            `part-${index + 1}`,
            await readDatasetPart(bytes, "digits.csv", plan, index, COLUMNS),
            { minimumShardRows: 1, threads: 1 },
          ),
      ),
    );
    try {
      const whole = new PartsConnection("digits.csv", parts);
      const [central, merged] = [
        await analyzePartition({ data: { path: file }, options: COLUMNS, threads: 1 }),
        await analyzeFromDigests([whole], {
          lambda: 1e-3,
          reference: "optimum",
          plan: PLAN,
          minimumShardRows: 1,
        }),
      ];
      // Every shard has rows in every part: each part's rows of a shard are summed with the others'.
      const partSchemas = await Promise.all(parts.map((part) => part.schema()));
      for (const schema of partSchemas) expect(schema.shards).toHaveLength(12);
      expect(central.dataset.rows).toBe(41_331);
      const differences = compareSummaries(central, merged, false).filter(
        // ‖∇F(W*)‖ is the optimizer's residual: compared with its tolerance below.
        (line) => !line.startsWith(".model.gradNorm"),
      );
      expect(differences).toEqual([]);
      expect(merged.model.gradNorm).toBeLessThanOrEqual(merged.model.optimizer.tolerance);
    } finally {
      await Promise.all(parts.map((part) => part.close()));
    }
  }, 900_000);

  it("gives the same summary with each part's rows in scratch files past a memory limit", async () => {
    // One copy of the digits (1 797 rows): the fit's subsample is every row, so its Hessian is
    // asked over all of a part's rows, and the ink category is one-hot encoded from the file.
    const folder = mkdtempSync(path.join(tmpdir(), "partita-parts-"));
    const file = path.join(folder, "digits.csv");
    writeFileSync(file, loadStackedDigitsCsv(1));
    const bytes = await localDatasetBytes(file);
    const plan = await planDatasetParts(bytes, "digits.csv", 2);
    expect(plan.parts).toHaveLength(2);
    const scratchFiles: string[] = [];
    const memory = {
      limitBytes: 2 ** 20,
      scratchDirectory: folder,
      onScratchFile: (scratch: string) => scratchFiles.push(scratch),
    };
    const parts = await Promise.all(
      plan.parts.map(
        async (_, index) =>
          new LocalDigestClient(
            `part-${index + 1}`,
            await readDatasetPart(bytes, "digits.csv", plan, index, COLUMNS, { memory }),
            { minimumShardRows: 1, threads: 1, memory },
          ),
      ),
    );
    try {
      const central = await analyzePartition({
        data: { path: file },
        options: COLUMNS,
        threads: 1,
      });
      const merged = await analyzeFromDigests([new PartsConnection("digits.csv", parts)], {
        lambda: 1e-3,
        reference: "optimum",
        plan: PLAN,
        minimumShardRows: 1,
      });
      // Each part's values, then its encoded rows, went to a scratch file of their own.
      expect(scratchFiles).toHaveLength(4);
      const differences = compareSummaries(central, merged, false).filter(
        (line) => !line.startsWith(".model.gradNorm"),
      );
      expect(differences).toEqual([]);
      expect(merged.model.gradNorm).toBeLessThanOrEqual(merged.model.optimizer.tolerance);
    } finally {
      await Promise.all(parts.map((part) => part.close()));
    }
  }, 300_000);

  it("gives the CSV's one-process summary to 1e-9 for the same table as Parquet, cut by row groups", async () => {
    // The digits as Parquet in row groups of 4 000 rows (11 of them): the parts are whole row
    // groups, their rows numbered from the file's, and the summary is the CSV's.
    const folder = mkdtempSync(path.join(tmpdir(), "partita-parts-"));
    const csvFile = path.join(folder, "digits.csv");
    const parquetFile = path.join(folder, "digits.parquet");
    const csv = loadStackedDigitsCsv(23);
    writeFileSync(csvFile, csv);
    writeFileSync(parquetFile, writeCsvAsParquet(csv, 4000));
    const bytes = await localDatasetBytes(parquetFile);
    const plan = await planDatasetParts(bytes, "digits.parquet", 3);
    expect(plan.format).toBe("parquet");
    expect(plan.parts).toHaveLength(3);
    const parts = await Promise.all(
      plan.parts.map(
        async (_, index) =>
          new LocalDigestClient(
            `part-${index + 1}`,
            await readDatasetPart(bytes, "digits.parquet", plan, index, COLUMNS),
            { minimumShardRows: 1, threads: 1 },
          ),
      ),
    );
    try {
      // Every row is in exactly one part, whole row groups each.
      const partRows = await Promise.all(
        parts.map(async (part) => (await part.schema()).totalRows),
      );
      expect(partRows.reduce((sum, rows) => sum + rows, 0)).toBe(41_331);
      for (const rows of partRows.slice(0, -1)) expect(rows % 4000).toBe(0);
      const central = await analyzePartition({
        data: { path: csvFile },
        options: COLUMNS,
        threads: 1,
      });
      const merged = await analyzeFromDigests([new PartsConnection("digits.parquet", parts)], {
        lambda: 1e-3,
        reference: "optimum",
        plan: PLAN,
        minimumShardRows: 1,
      });
      const differences = compareSummaries(central, merged, false).filter(
        (line) => !line.startsWith(".model.gradNorm"),
      );
      expect(differences).toEqual([]);
      expect(merged.model.gradNorm).toBeLessThanOrEqual(merged.model.optimizer.tolerance);
    } finally {
      await Promise.all(parts.map((part) => part.close()));
    }
  }, 900_000);

  it("keeps whole, saying why, a gzip file and a Parquet file of one row group", async () => {
    const folder = mkdtempSync(path.join(tmpdir(), "partita-parts-"));
    const csv = loadStackedDigitsCsv(1);
    const gzipFile = path.join(folder, "digits.csv.gz");
    writeFileSync(gzipFile, gzipSync(csv));
    const gzipPlan = await planDatasetParts(await localDatasetBytes(gzipFile), "digits.csv.gz", 3);
    expect(gzipPlan.parts).toHaveLength(1);
    expect(gzipPlan.wholeBecause).toBe(
      "the file is gzip-compressed, and compressed data can only be read from its start",
    );
    const parquetFile = path.join(folder, "digits.parquet");
    writeFileSync(parquetFile, writeCsvAsParquet(csv, 10_000));
    const parquetPlan = await planDatasetParts(
      await localDatasetBytes(parquetFile),
      "digits.parquet",
      3,
    );
    expect(parquetPlan.parts).toHaveLength(1);
    expect(parquetPlan.wholeBecause).toBe(
      "the Parquet file has one row group, and a Parquet file is cut between row groups",
    );
  });
});
