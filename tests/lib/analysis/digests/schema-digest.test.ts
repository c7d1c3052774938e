import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import {
  computeSchemaDigest,
  readClientRows,
  type SchemaDigest,
  type SchemaDigestOptions,
} from "@/lib/analysis/digests";
import type { DatasetColumnChoice } from "@/lib/analysis/read-dataset";
import { loadPenguinsCsv } from "../support/open-data";
import { PYTHON_TOKEN_RULES, runPythonJson } from "../support/run-python";

/**
 * Round 1 of methods.md §9 checked against pandas and math.fsum. Outside reference: the CSV read by
 * pandas as text, rows with a missing label dropped (methods.md §1's missing tokens), then per
 * shard: the kept rows, per column the count of non-missing values, Σx (math.fsum: correctly
 * rounded), Σ(x − x̄ₘ)² about the shard's mean (math.fsum), min and max of the values that parse
 * as numbers (a column is numeric when all do), and the count of each token when the column has
 * at most 32 distinct values (methods.md §1's one-hot limit; the label's are always counted).
 */
const REFERENCE = `import io, json, math, sys
from collections import Counter
import pandas as pd
d = json.load(sys.stdin)
frame = pd.read_csv(io.StringIO(d["csv"]), dtype=str, keep_default_na=False)
${PYTHON_TOKEN_RULES}
total = len(frame)
frame = frame[~frame[d["label"]].map(missing)]
def describe(tokens, always_levels):
    present = [t.strip() for t in tokens if not missing(t)]
    return present, always_levels
def column_is_numeric(name):
    return all(number(t) is not None for t in frame[name] if not missing(t))
def distinct(name):
    return len({t.strip() for t in frame[name] if not missing(t)})
def summary(tokens, numeric, count_levels):
    present = [t.strip() for t in tokens if not missing(t)]
    out = {"present": len(present), "sum": None, "sumSquaredDeviations": None, "min": None, "max": None,
           "levels": dict(Counter(present)) if count_levels else None}
    if numeric and present:
        values = [number(t) for t in present]
        total = math.fsum(values); mean = total / len(values)
        out.update(sum=total, sumSquaredDeviations=math.fsum((x - mean) ** 2 for x in values),
                   min=min(values), max=max(values))
    return out
features = d["features"]
numeric = {name: column_is_numeric(name) for name in features + [d["label"]]}
shards = {}
for shard, rows in frame.groupby(d["shard"], sort=False):
    label = summary(rows[d["label"]], numeric[d["label"]], d["labelLevels"])
    del label["present"]
    shards[shard] = {"rows": len(rows), "label": label,
        "columns": [summary(rows[name], numeric[name], distinct(name) <= 32) for name in features]}
print(json.dumps({"totalRows": total, "dropped": total - len(frame), "numeric": numeric, "shards": shards}))`;

interface ReferenceColumn {
  present?: number;
  sum: number | null;
  sumSquaredDeviations: number | null;
  min: number | null;
  max: number | null;
  levels: Record<string, number> | null;
}

interface Reference {
  totalRows: number;
  dropped: number;
  numeric: Record<string, boolean>;
  shards: Record<string, { rows: number; label: ReferenceColumn; columns: ReferenceColumn[] }>;
}

async function digestOf(
  csv: string,
  columns: DatasetColumnChoice & { shardColumn: string },
  options: Omit<SchemaDigestOptions, "client"> = {},
): Promise<SchemaDigest> {
  const raw = await readClientRows({
    data: Readable.from([Buffer.from(csv, "utf8")]),
    dataName: "client.csv",
    columns,
  });
  return computeSchemaDigest(raw, { client: "north", ...options });
}

/** Equal numbers to `tolerance` relative (null and exact values compared as they are). */
function expectColumn(actual: ReferenceColumn, expected: ReferenceColumn, where: string) {
  for (const key of ["sum", "sumSquaredDeviations"] as const) {
    const [a, e] = [actual[key], expected[key]];
    if (e === null) expect(a, `${where} ${key}`).toBeNull();
    else
      expect(Math.abs((a as number) - e), `${where} ${key}`).toBeLessThanOrEqual(
        1e-13 * Math.abs(e),
      );
  }
  expect(actual.min, `${where} min`).toBe(expected.min);
  expect(actual.max, `${where} max`).toBe(expected.max);
  expect(actual.levels, `${where} levels`).toEqual(expected.levels);
  if (expected.present !== undefined)
    expect(actual.present, `${where} present`).toBe(expected.present);
}

async function checkAgainstPandas(
  csv: string,
  columns: DatasetColumnChoice & { shardColumn: string },
  options: Omit<SchemaDigestOptions, "client"> = {},
): Promise<SchemaDigest> {
  const digest = await digestOf(csv, columns, options);
  const reference = runPythonJson<Reference>(REFERENCE, {
    csv,
    label: columns.labelColumn,
    shard: columns.shardColumn,
    features: digest.features,
    labelLevels: digest.shards[0].label.levels !== null,
  });
  expect(digest.totalRows).toBe(reference.totalRows);
  expect(digest.droppedRowsMissingLabel).toBe(reference.dropped);
  expect(digest.labelNumeric).toBe(reference.numeric[columns.labelColumn]);
  expect(digest.columnsNumeric).toEqual(digest.features.map((name) => reference.numeric[name]));
  expect(digest.shards.map((shard) => shard.id).sort()).toEqual(
    Object.keys(reference.shards).sort(),
  );
  for (const shard of digest.shards) {
    const expected = reference.shards[shard.id];
    expect(shard.rows, shard.id).toBe(expected.rows);
    expectColumn({ ...shard.label }, expected.label, `${shard.id} label`);
    shard.columns.forEach((column, k) =>
      expectColumn(column, expected.columns[k], `${shard.id} ${digest.features[k]}`),
    );
  }
  return digest;
}

/**
 * Invented data for sums that lose digits when added plainly: in shard s1, 10¹⁶ + 1 + 1 + 1 + 1 −
 * 10¹⁶ (plain left-to-right addition gives 0, the sum is 4) beside six missing values; in s2 the
 * deviations 3·10⁸, −3·10⁸ and forty ±1, whose squares 9·10¹⁶ swallow each 1 added plainly. A
 * text column with one shard all missing; the label is numeric with two values.
 */
function cancellingCsv(): string {
  const lines = ["y,shard,x,z,tag,w"];
  const s1x = ["1e16", "1", "1", "1", "1", "-1e16", "", "", "", "", "", ""];
  s1x.forEach((x, i) => lines.push(`${i % 2},s1,${x},${i},,`));
  const s2z = ["3e8", "-3e8", ...Array.from({ length: 40 }, (_, i) => (i % 2 ? "-1" : "1"))];
  s2z.forEach((z, i) =>
    lines.push(`${(i * 7) % 3 === 0 ? 1 : 0},s2,${i % 5},${z},t${i % 3},${i / 4}`),
  );
  return `${lines.join("\n")}\n`;
}

describe("the schema digest (methods.md §9 round 1)", () => {
  it("penguins by island (vega-datasets): per-shard counts, sums, centred squares, extremes and levels equal pandas'", async () => {
    const { csv } = loadPenguinsCsv();
    const digest = await checkAgainstPandas(csv, {
      labelColumn: "Species",
      shardColumn: "Island",
      idColumn: "row",
    });
    expect(digest).toMatchObject({
      kind: "partita-schema-digest",
      version: 1,
      client: "north",
      labelColumn: "Species",
      featuresNamed: false,
    });
    expect(digest.shards).toHaveLength(3);
    expect(digest.labelNumeric).toBe(false);
    expect(digest.columnsNumeric).toContain(false);
    expect(digest.shards.every((shard) => shard.label.levels !== null)).toBe(true);
  });

  it("penguins with a numeric label: its Σy, centred Σy², extremes, and no level counts for regression", async () => {
    const { csv } = loadPenguinsCsv();
    const digest = await checkAgainstPandas(
      csv,
      { labelColumn: "Body Mass (g)", shardColumn: "Island", idColumn: "row" },
      { task: "regression" },
    );
    expect(digest.droppedRowsMissingLabel).toBeGreaterThan(0);
    expect(digest.shards[0].label.levels).toBeNull();
    expect(digest.shards[0].label.sum).not.toBeNull();
  });

  it("adds with compensation: sums and centred squares equal math.fsum's where plain addition loses them", async () => {
    const digest = await checkAgainstPandas(cancellingCsv(), {
      labelColumn: "y",
      shardColumn: "shard",
    });
    const s1 = digest.shards.find((shard) => shard.id === "s1")!;
    const s2 = digest.shards.find((shard) => shard.id === "s2")!;
    // The check can fail: plain addition gives 0 and 1.8e17 (identities written beside the data).
    expect(s1.columns[0].sum).toBe(4);
    expect(s2.columns[1].sumSquaredDeviations).toBe(1.8e17 + 32);
    expect(s1.columns[0].present).toBe(6);
    expect(s1.columns[2]).toEqual({
      present: 0,
      sum: null,
      sumSquaredDeviations: null,
      min: null,
      max: null,
      levels: {},
    });
    // A numeric column with no value in one shard: no sums for it, not sums of nothing.
    expect(digest.columnsNumeric[3]).toBe(true);
    expect(s1.columns[3]).toEqual({
      present: 0,
      sum: null,
      sumSquaredDeviations: null,
      min: null,
      max: null,
      levels: null,
    });
    // A numeric label with two values: its counts are sent (the task is chosen from them later).
    expect(s2.label.levels).not.toBeNull();
  });

  it("refuses a shard under the minimum rows, naming client, shard and count; accepts one at it", async () => {
    const { csv } = loadPenguinsCsv();
    const columns = { labelColumn: "Species", shardColumn: "Island", idColumn: "row" };
    // Torgersen holds 52 penguins (pandas' count above).
    await expect(digestOf(csv, columns, { minimumShardRows: 53 })).rejects.toMatchObject({
      message: expect.stringContaining(
        'client "north", shard "Torgersen" has 52 rows, under the minimum of 53',
      ),
      file: "client.csv",
      expected: "at least 53 kept rows per shard",
    });
    await expect(digestOf(csv, columns, { minimumShardRows: 52 })).resolves.toBeDefined();
    // The default minimum of methods.md §9 is 10 rows.
    const small = [
      "y,shard,x",
      ...Array.from({ length: 19 }, (_, i) => `${i % 2},${i < 10 ? "a" : "b"},${i}`),
    ];
    await expect(
      digestOf(`${small.join("\n")}\n`, { labelColumn: "y", shardColumn: "shard" }),
    ).rejects.toThrow('shard "b" has 9 rows, under the minimum of 10');
  });

  it("refuses a named feature that is neither numeric nor encodable (row and column named), unless told to leave it", async () => {
    const lines = ["y,shard,code,x"];
    for (let i = 0; i < 40; i++) lines.push(`${i % 2},${i < 20 ? "a" : "b"},k${i},${i}`);
    const csv = `${lines.join("\n")}\n`;
    const columns = { labelColumn: "y", shardColumn: "shard", features: ["code", "x"] };
    const refusal = digestOf(csv, columns);
    await expect(refusal).rejects.toThrow('the feature is not numeric ("k0")');
    await expect(refusal).rejects.toMatchObject({
      column: "code",
      row: expect.any(Number),
      file: "client.csv",
      expected: "numbers, or at most 32 distinct categories",
    });
    // A named numeric feature passes, though with 40 distinct numbers its levels are not counted.
    const numeric = await digestOf(csv, { ...columns, features: ["x"] });
    expect(numeric.featuresNamed).toBe(true);
    expect(numeric.shards[0].columns[0].levels).toBeNull();
    const kept = await digestOf(csv, columns, { refuseUnencodable: false });
    expect(kept.columnsNumeric).toEqual([false, true]);
    expect(kept.shards[0].columns[0].levels).toBeNull();
    // Not named: the coordinator leaves such a column out.
    const unnamed = await digestOf(csv, { labelColumn: "y", shardColumn: "shard" });
    expect(unnamed.featuresNamed).toBe(false);
  });
});
