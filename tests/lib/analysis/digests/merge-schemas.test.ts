import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import {
  computeEncodingHash,
  computeSchemaDigest,
  mergeSchemaDigests,
  readClientRows,
  type DigestEncoding,
  type SchemaDigest,
} from "@/lib/analysis/digests";
import type { Task } from "@/lib/analysis/design";
import { loadPenguinsRecords } from "../support/open-data";
import { PYTHON_TOKEN_RULES, runPythonJson } from "../support/run-python";

/**
 * The coordinator's merge of round 1 (methods.md §9) against pandas on the pooled rows: the
 * identity of §9 (the encoding of the digests of any split equals that of all rows in one place)
 * with §1's preprocessing computed by pandas — the task (non-numeric label, or at most 20 distinct
 * values, is classification), classes in code-point order (Python's string order), each numeric
 * column's mean and population deviation after imputing the mean (`fillna(mean).std(ddof=0)`), one
 * column per level of a text column with at most 32 levels (mean = share of rows, deviation
 * √(m(1 − m))), columns with deviation under 1e-12 dropped, and the target's mean, population
 * deviation, min and max for regression.
 */
const REFERENCE = `import io, json, math, sys
import numpy as np
import pandas as pd
d = json.load(sys.stdin)
frame = pd.read_csv(io.StringIO(d["csv"]), dtype=str, keep_default_na=False)
${PYTHON_TOKEN_RULES}
def numbers(tokens):
    values = [None if missing(t) else number(t) for t in tokens]
    ok = all(v is not None for v, t in zip(values, tokens) if not missing(t))
    return pd.Series([np.nan if v is None else v for v in values], dtype=float) if ok else None
frame = frame[~frame[d["label"]].map(missing)].reset_index(drop=True)
N = len(frame)
label = numbers(frame[d["label"]])
distinct = sorted({t.strip() for t in frame[d["label"]]})
task = d["task"] or ("classification" if label is None or len(distinct) <= 20 else "regression")
out = {"rows": N, "shardCount": int(frame[d["shard"]].nunique()), "task": task,
       "classes": distinct if task == "classification" else None, "target": None,
       "columns": [], "omitted": []}
if task == "regression":
    out["target"] = {"mean": float(label.mean()), "std": float(label.std(ddof=0)),
                     "min": float(label.min()), "max": float(label.max())}
for name in frame.columns:
    if name in (d["label"], d["shard"]):
        continue
    tokens = frame[name]
    present = [t.strip() for t in tokens if not missing(t)]
    if not present:
        out["omitted"].append({"column": name, "reason": "all-missing"}); continue
    values = numbers(tokens)
    if values is not None:
        mean = float(values.mean()); std = float(values.fillna(mean).std(ddof=0))
        if std < 1e-12: out["omitted"].append({"column": name, "reason": "constant"})
        else: out["columns"].append({"kind": "numeric", "column": name, "mean": mean, "std": std})
        continue
    levels = sorted(set(present))
    if len(levels) > 32:
        out["omitted"].append({"column": name, "reason": "too-many-levels"}); continue
    for level in levels:
        m = sum(1 for t in present if t == level) / N; std = math.sqrt(m * (1 - m))
        if std < 1e-12: out["omitted"].append({"column": name + "=" + level, "reason": "constant"})
        else: out["columns"].append({"kind": "level", "column": name, "level": level, "mean": m, "std": std})
print(json.dumps(out))`;

type Reference = Pick<DigestEncoding, "rows" | "shardCount" | "task" | "classes" | "target"> & {
  columns: DigestEncoding["columns"];
  omitted: DigestEncoding["omittedColumns"];
};

/**
 * The vega-datasets penguins (without their id) with a shard column of five shards by row index,
 * and invented columns that exercise §1's rules: one constant, one all missing, a text column with
 * 40 distinct values and one with exactly 32, one level in every row, a number missing in one
 * shard, and a column of numbers for one client and text for the others (a text column pooled).
 */
function penguinsCsv(): string {
  const records = loadPenguinsRecords();
  const names = Object.keys(records[0]);
  const extra = ["shard", "constant", "empty", "code", "kind", "partial", "mix", "code32"];
  const lines = [[...names, ...extra].join(",")];
  records.forEach((record, i) => {
    const fields = names.map((name) => (record[name] === null ? "" : String(record[name])));
    const partial = i % 5 === 0 ? "" : String((i * 7) % 13);
    const mix = i % 5 < 2 ? String(i % 3) : `t${i % 3}`;
    lines.push(
      [...fields, `s${i % 5}`, "5", "", `k${i % 40}`, "x", partial, mix, `c${i % 32}`].join(","),
    );
  });
  return `${lines.join("\n")}\n`;
}

/** The rows whose shard is in `shards`, as one client's CSV. */
function clientCsv(csv: string, shardColumn: string, shards: string[]): string {
  const [header, ...lines] = csv.trimEnd().split("\n");
  const index = header.split(",").indexOf(shardColumn);
  return `${[header, ...lines.filter((line) => shards.includes(line.split(",")[index]))].join("\n")}\n`;
}

async function schemaOf(client: string, csv: string, labelColumn: string, task?: Task) {
  const raw = await readClientRows({
    data: Readable.from([Buffer.from(csv, "utf8")]),
    dataName: `${client}.csv`,
    columns: { labelColumn, shardColumn: "shard" },
  });
  return computeSchemaDigest(raw, { client, task });
}

/** Every number within 1e-12 relative (a mean near 0 against the column's deviation). */
function expectClose(actual: number, expected: number, scale: number, what: string) {
  expect(Math.abs(actual - expected), what).toBeLessThanOrEqual(1e-12 * scale);
}

function expectEncoding(encoding: DigestEncoding, reference: Reference) {
  expect(encoding.task).toBe(reference.task);
  expect(encoding.classes).toEqual(reference.classes);
  expect(encoding.rows).toBe(reference.rows);
  expect(encoding.shardCount).toBe(reference.shardCount);
  expect(encoding.omittedColumns).toEqual(reference.omitted);
  const identity = (column: DigestEncoding["columns"][number]) =>
    column.kind === "numeric"
      ? [column.kind, column.column]
      : [column.kind, column.column, column.level];
  expect(encoding.columns.map(identity)).toEqual(reference.columns.map(identity));
  encoding.columns.forEach((column, k) => {
    const expected = reference.columns[k];
    expectClose(
      column.mean,
      expected.mean,
      Math.max(Math.abs(expected.mean), expected.std),
      `${column.column} mean`,
    );
    expectClose(column.std, expected.std, expected.std, `${column.column} std`);
  });
  expect(encoding.featureNames).toEqual(
    reference.columns.map((c) => (c.kind === "numeric" ? c.column : `${c.column}=${c.level}`)),
  );
  if (reference.target === null) {
    expect(encoding.target).toBeNull();
  } else {
    const target = encoding.target!;
    expectClose(target.mean, reference.target.mean, reference.target.std, "target mean");
    expectClose(target.std, reference.target.std, reference.target.std, "target std");
    expect(target.min).toBe(reference.target.min);
    expect(target.max).toBe(reference.target.max);
  }
  expect(encoding.hash).toBe(computeEncodingHash(encoding));
}

// Shards pooled in the order one client holding all rows lists them, so the sums add alike.
const CLIENT_SHARDS = [["s0", "s1"], ["s2"], ["s3", "s4"]];

async function mergeSplit(csv: string, labelColumn: string, task?: Task) {
  const digests = await Promise.all(
    CLIENT_SHARDS.map((shards, c) =>
      schemaOf(`client-${c}`, clientCsv(csv, "shard", shards), labelColumn, task),
    ),
  );
  return { digests, encoding: mergeSchemaDigests(digests, { task }) };
}

function reference(csv: string, label: string, task?: Task): Reference {
  return runPythonJson<Reference>(REFERENCE, { csv, label, shard: "shard", task: task ?? null });
}

describe("merging schema digests into the encoding (methods.md §1, §9)", () => {
  it("classification: three clients' digests give pandas' preprocessing of the pooled penguins", async () => {
    const csv = penguinsCsv();
    const { encoding } = await mergeSplit(csv, "Species");
    expectEncoding(encoding, reference(csv, "Species"));
    expect(encoding.kind).toBe("partita-encoding");
    expect(encoding.warnings).toEqual([
      'column "empty" has no values and was left out',
      'column "code" is not numeric and has more than 32 distinct values; it was left out',
    ]);
    // The identity of §9: the same encoding, hash included, from all rows as one client.
    const whole = mergeSchemaDigests([await schemaOf("all", csv, "Species")]);
    expect(whole).toEqual(encoding);
  });

  it("regression: a numeric label with more than 20 values gets pandas' target mean, deviation and range", async () => {
    // Two penguins have no body mass: both sides drop them.
    const csv = penguinsCsv();
    const { encoding } = await mergeSplit(csv, "Body Mass (g)");
    expect(encoding.task).toBe("regression");
    expectEncoding(encoding, reference(csv, "Body Mass (g)"));
  });

  it("a numeric label with at most 20 values is classification, classes in code-point order", async () => {
    const lines = ["y,shard,x"];
    for (let i = 0; i < 60; i++) lines.push(`${[2, 10, 33][i % 3]},s${i % 5},${(i * 37) % 11}`);
    const csv = `${lines.join("\n")}\n`;
    const { encoding } = await mergeSplit(csv, "y");
    expectEncoding(encoding, reference(csv, "y"));
    expect(encoding.classes).toEqual(["10", "2", "33"]);
    // The analysis may fix the task: regression then, with the target's moments.
    const forced = await mergeSplit(csv, "y", "regression");
    expectEncoding(forced.encoding, reference(csv, "y", "regression"));
  });
});

/** 150 rows whose label takes, per client, the values first … first + count − 1 in turn. */
function labelsPerClient(first: number[], count: number[]): string {
  const lines = ["y,shard,x"];
  for (let i = 0; i < 150; i++) {
    const client = CLIENT_SHARDS.findIndex((shards) => shards.includes(`s${i % 5}`));
    const value = first[client] + (Math.floor(i / 5) % count[client]);
    lines.push(`${value},s${i % 5},${(i * 37) % 11}`);
  }
  return `${lines.join("\n")}\n`;
}

describe("the task from a numeric label's values over all clients (methods.md §1)", () => {
  it("is regression past 20 values, though each client holds fewer, and classification at 20", async () => {
    // Each client holds 10 values (each sends its counts); together 30.
    const thirty = labelsPerClient([0, 10, 20], [10, 10, 10]);
    const { encoding } = await mergeSplit(thirty, "y");
    expect(encoding.task).toBe("regression");
    expectEncoding(encoding, reference(thirty, "y"));
    const twenty = labelsPerClient([0, 7, 14], [7, 7, 6]);
    expect((await mergeSplit(twenty, "y")).encoding.task).toBe("classification");
  });

  it("warns when no feature column is left: only the bias", async () => {
    const lines = ["y,shard,c"];
    for (let i = 0; i < 60; i++) lines.push(`${i % 2 ? "a" : "b"},s${i % 5},5`);
    const { encoding } = await mergeSplit(`${lines.join("\n")}\n`, "y");
    expect(encoding.columns).toEqual([]);
    expect(encoding.warnings).toEqual(["no usable feature columns: the model has only the bias"]);
  });
});

/** The refusal `merge` throws (the test fails when it throws none). */
function refusalOf(merge: () => unknown): unknown {
  try {
    merge();
  } catch (error) {
    return error;
  }
  throw new Error("no refusal");
}

describe("refusing schema digests that do not belong together (methods.md §9)", () => {
  async function twoClients(): Promise<SchemaDigest[]> {
    const csv = penguinsCsv();
    return [
      await schemaOf("north", clientCsv(csv, "shard", ["s0", "s1"]), "Species"),
      await schemaOf("south", clientCsv(csv, "shard", ["s2"]), "Species"),
    ];
  }

  it("names the client, shard and what was expected", async () => {
    const [north, south] = await twoClients();
    expect(refusalOf(() => mergeSchemaDigests([]))).toMatchObject({
      problem: "no schema digests were given",
      expected: "one schema digest per client",
    });
    expect(
      refusalOf(() => mergeSchemaDigests([north, { ...south, client: "north" }])),
    ).toMatchObject({
      problem: 'client "north" sent two schema digests',
      expected: "one schema digest per client",
    });
    expect(
      refusalOf(() => mergeSchemaDigests([north, { ...south, labelColumn: "Island" }])),
    ).toMatchObject({
      problem: 'client "south" used the label column "Island"',
      column: "Island",
      expected: 'the label column "Species"',
    });
    expect(
      refusalOf(() =>
        mergeSchemaDigests([north, { ...south, features: [...south.features.slice(1), "other"] }]),
      ),
    ).toMatchObject({
      problem: 'client "south" has other feature columns',
      expected: `the feature columns ${north.features.join(", ")}`,
    });
    // The same features in another order agree.
    const reordered = { ...south, features: [...south.features].reverse() };
    expect(() => mergeSchemaDigests([north, reordered])).not.toThrow(/feature columns/);
    const twice = { ...south, shards: [{ ...south.shards[0], id: "s1" }] };
    expect(refusalOf(() => mergeSchemaDigests([north, twice]))).toMatchObject({
      problem: 'shard "s1" was sent twice (by client "north" and by client "south")',
      expected: "every shard held by exactly one client",
    });
    const few = { ...south, shards: [{ ...south.shards[0], rows: 12 }] };
    expect(
      refusalOf(() => mergeSchemaDigests([north, few], { minimumShardRows: 13 })),
    ).toMatchObject({
      problem: 'client "south", shard "s2" has 12 rows, under the minimum of 13',
      expected: "at least 13 kept rows per shard",
    });
    expect(() => mergeSchemaDigests([north, few], { minimumShardRows: 12 })).not.toThrow();
    const small = { ...south, shards: [{ ...south.shards[0], rows: 9 }] };
    expect(() => mergeSchemaDigests([north, small])).toThrow("under the minimum of 10");
  });

  it("refuses one shard, one class, a text label for regression, a constant label and an unusable named feature", async () => {
    const [north, south] = await twoClients();
    expect(refusalOf(() => mergeSchemaDigests([{ ...south }]))).toMatchObject({
      problem: "the clients sent 1 shard",
      expected: "at least two shards over all clients",
    });
    // Two shards suffice (north holds two).
    expect(mergeSchemaDigests([north]).shardCount).toBe(2);
    const adelie = (digest: SchemaDigest): SchemaDigest => ({
      ...digest,
      shards: digest.shards.map((shard) => ({
        ...shard,
        label: { ...shard.label, levels: { Adelie: shard.rows } },
      })),
    });
    expect(refusalOf(() => mergeSchemaDigests([adelie(north), adelie(south)]))).toMatchObject({
      problem: 'the label has a single class ("Adelie")',
      column: "Species",
      expected: "at least two classes",
    });
    // Two classes suffice; a level counted 0 times is no class.
    const twoClasses = (digest: SchemaDigest): SchemaDigest => ({
      ...digest,
      shards: digest.shards.map((shard) => ({
        ...shard,
        label: { ...shard.label, levels: { Adelie: shard.rows - 1, Gentoo: 1, Chinstrap: 0 } },
      })),
    });
    expect(mergeSchemaDigests([twoClasses(north), twoClasses(south)]).classes).toEqual([
      "Adelie",
      "Gentoo",
    ]);
    expect(
      refusalOf(() => mergeSchemaDigests([north, south], { task: "regression" })),
    ).toMatchObject({
      problem: "regression needs a numeric label",
      column: "Species",
      expected: "a number on every kept row of every client",
    });
    // Numeric for one client is not numeric for all.
    expect(() =>
      mergeSchemaDigests([{ ...north, labelNumeric: true }, south], { task: "regression" }),
    ).toThrow("regression needs a numeric label");
    const numericLabel = (digest: SchemaDigest, value: number): SchemaDigest => ({
      ...digest,
      labelNumeric: true,
      shards: digest.shards.map((shard) => ({
        ...shard,
        label: {
          sum: value * shard.rows,
          sumSquaredDeviations: 0,
          min: value,
          max: value,
          levels: null,
        },
      })),
    });
    expect(
      refusalOf(() =>
        mergeSchemaDigests([numericLabel(north, 3), numericLabel(south, 3)], {
          task: "regression",
        }),
      ),
    ).toMatchObject({
      problem: "the label is constant",
      column: "Species",
      expected: "a label that varies",
    });
    expect(
      refusalOf(() =>
        mergeSchemaDigests([numericLabel(north, 3), numericLabel(south, 3)], {
          task: "classification",
        }),
      ),
    ).toMatchObject({
      problem: "a client did not count the label's values",
      column: "Species",
      expected: "schema digests made with the task set to classification",
    });
    // Over all five shards the invented "code" column has 40 values.
    const { digests } = await mergeSplit(penguinsCsv(), "Species");
    const named = (digest: SchemaDigest): SchemaDigest => ({ ...digest, featuresNamed: true });
    expect(refusalOf(() => mergeSchemaDigests(digests.map(named)))).toMatchObject({
      problem: "the feature is not numeric and has more than 32 distinct values over all clients",
      column: "code",
      expected: "numbers, or at most 32 distinct categories",
    });
    // A level a digest counts 0 times adds no column.
    const withZero = digests.map((digest) => ({
      ...digest,
      shards: digest.shards.map((shard) => ({
        ...shard,
        columns: shard.columns.map((column, k) =>
          digest.features[k] === "Sex"
            ? { ...column, levels: { ...column.levels, none: 0 } }
            : column,
        ),
      })),
    }));
    expect(mergeSchemaDigests(withZero).featureNames).toEqual(
      mergeSchemaDigests(digests).featureNames,
    );
  });
});
