import { mkdtempSync, readdirSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import { isDesignOnDisk, type Design, type EncodedDesign, type Task } from "@/lib/analysis/design";
import {
  binIntoDeciles,
  encodeDesign,
  MAX_CLASSES_FOR_NUMERIC_LABEL,
  MIN_FEATURE_STD,
} from "@/lib/analysis/encode-design";
import { measureLimitForRows, type MemorySettings } from "@/lib/analysis/memory-limit";
import { readDataset } from "@/lib/analysis/read-dataset";
import type { DatasetColumnChoice } from "@/lib/analysis/read-dataset";
import { forEachStoredBlock } from "@/lib/analysis/stored-matrix";
import { runPythonJson } from "./support/run-python";

async function readRaw(csv: string, columns: Partial<DatasetColumnChoice> = {}) {
  return readDataset(
    Readable.from([csv]),
    "data.csv",
    { labelColumn: "label", shardColumn: "shard", ...columns },
    { partition: null, dropUnassignedRows: false },
  );
}

async function encode(
  csv: string,
  columns: Partial<DatasetColumnChoice> = {},
  { task, badNumbersAsMissing }: { task?: Task; badNumbersAsMissing?: boolean } = {},
): Promise<Design> {
  return encodeDesign(await readRaw(csv, columns), task, { badNumbersAsMissing });
}

/** The design's values, read back from its scratch file when it is on disk. */
function valuesOf(design: EncodedDesign): number[] {
  if (!isDesignOnDisk(design)) return Array.from(design.x.data);
  const values: number[] = [];
  forEachStoredBlock(design.x, (block) => values.push(...block));
  design.x.file.close();
  return values;
}

/** A seeded generator (invented data, for checks against outside references only). */
function seeded(seed: number) {
  let state = seed;
  return () => {
    state = (state * 1103515245 + 12345) % 2147483648;
    return state / 2147483648;
  };
}

/**
 * Outside reference: methods.md §1's preprocessing in pandas and scikit-learn — missing tokens as NaN,
 * SimpleImputer(mean), OneHotEncoder over the levels in code-point order (missing → all zeros),
 * StandardScaler (population deviation), constant and all-missing columns dropped, the bias appended,
 * rows regrouped by shard in code-point order keeping file order within a shard (a stable sort).
 */
const PREPROCESS_PROGRAM = `import sys, io, json
import numpy as np, pandas as pd
from sklearn.impute import SimpleImputer
from sklearn.preprocessing import OneHotEncoder, StandardScaler
def preprocess(d):
  frame = pd.read_csv(io.StringIO(d["csv"]), dtype=str, keep_default_na=False)
  frame = frame.apply(lambda s: s.str.strip())
  missing = lambda s: s.str.lower().isin(["", "na", "n/a", "nan", "null", "none"])
  frame = frame[~missing(frame["label"])].reset_index(drop=True)
  order = np.argsort(frame["shard"].to_numpy(), kind="stable")
  blocks, names = [], []
  for column, kind in d["columns"]:
      if kind == "numeric":
          values = pd.to_numeric(frame[column].mask(missing(frame[column])))
          blocks.append(SimpleImputer(strategy="mean").fit_transform(values.to_frame())); names.append(column)
          continue
      present = frame[column].mask(missing(frame[column]))
      levels = sorted(present.dropna().unique())
      encoder = OneHotEncoder(categories=[levels], handle_unknown="ignore", sparse_output=False)
      blocks.append(encoder.fit_transform(present.fillna("\\0").to_frame()))
      names += [f"{column}={level}" for level in levels]
  X = np.hstack(blocks)
  keep = X.std(axis=0) >= 1e-12
  X = StandardScaler().fit_transform(X[:, keep])
  X = np.hstack([X, np.ones((len(X), 1))])[order]
  label = frame["label"].to_numpy()[order]
  classes = sorted(set(label))
  return {"x": X.ravel().tolist(), "names": [n for n, k in zip(names, keep) if k],
    "shards": sorted(set(frame["shard"])), "classes": classes,
    "labels": [classes.index(v) for v in label],
    "offsets": [int(v) for v in np.searchsorted(np.sort(frame["shard"].to_numpy()), sorted(set(frame["shard"])))]}
print(json.dumps([preprocess(d) for d in json.load(sys.stdin)]))`;

interface PreprocessReference {
  x: number[];
  names: string[];
  shards: string[];
  classes: string[];
  labels: number[];
  offsets: number[];
}

function expectClose(actual: ArrayLike<number>, expected: number[], tolerance: number) {
  expect(actual.length).toBe(expected.length);
  expected.forEach((value, k) =>
    expect(Math.abs(actual[k] - value)).toBeLessThanOrEqual(tolerance),
  );
}

function mixedCsv(rows: number, seed: number): string {
  const random = seeded(seed);
  const lines = ["x,colour,flat,empty,label,shard,z"];
  for (let i = 0; i < rows; i++) {
    const x = random() < 0.1 ? "NA" : (random() * 10 - 3).toFixed(4);
    const colour = random() < 0.1 ? "" : ["red", "Green", "blue", "Zinc"][Math.floor(random() * 4)];
    const label = i === 7 ? "NA" : ["b", "a", "B"][Math.floor(random() * 3)];
    const z = (random() * 100).toFixed(2);
    lines.push([x, colour, "7", "null", label, ["s2", "s1", "S0", "s1"][i % 4], z].join(","));
  }
  return `${lines.join("\n")}\n`;
}

/** The mixed dataset: numbers with missing values, a text column, a constant and an empty one. */
const MIXED_CSV = mixedCsv(80, 4);

/** Numbers only, some missing: encoded in place. */
const NUMERIC_CSV = (() => {
  const random = seeded(9);
  const lines = ["a,b,label,shard"];
  for (let i = 0; i < 50; i++) {
    const a = (random() * 5).toFixed(3);
    const b = random() < 0.2 ? "" : (random() * 2 - 1).toFixed(3);
    lines.push([a, b, ["u", "v"][i % 2], ["q", "p", "r"][Math.floor(random() * 3)]].join(","));
  }
  return `${lines.join("\n")}\n`;
})();

/**
 * A text column with one level and missing values beside a numeric one: as many kept columns as
 * feature columns read, the first a one-hot level, so the design is written anew, not in place.
 */
const ONE_LEVEL_CSV = (() => {
  const random = seeded(23);
  const lines = ["t,x,label,shard"];
  for (let i = 0; i < 40; i++) {
    const t = random() < 0.3 ? "" : "on";
    const x = (random() * 8 - 2).toFixed(3);
    lines.push([t, x, ["u", "v"][i % 2], i % 3 === 0 ? "q" : "p"].join(","));
  }
  return `${lines.join("\n")}\n`;
})();

let preprocessed: PreprocessReference[] | null = null;

/** Both datasets through the reference pipeline, in one Python run (scikit-learn loads slowly). */
function preprocessReference(which: "mixed" | "numeric" | "one-level"): PreprocessReference {
  preprocessed ??= runPythonJson<PreprocessReference[]>(PREPROCESS_PROGRAM, [
    {
      csv: MIXED_CSV,
      columns: [
        ["x", "numeric"],
        ["colour", "categorical"],
        ["flat", "numeric"],
        ["z", "numeric"],
      ],
    },
    {
      csv: NUMERIC_CSV,
      columns: [
        ["a", "numeric"],
        ["b", "numeric"],
      ],
    },
    {
      csv: ONE_LEVEL_CSV,
      columns: [
        ["t", "categorical"],
        ["x", "numeric"],
      ],
    },
  ]);
  return preprocessed[["mixed", "numeric", "one-level"].indexOf(which)];
}

describe("a design beyond the memory limit", () => {
  it("goes to a scratch file with the same values once the values read and the design outgrow the limit", async () => {
    const scratchDirectory = mkdtempSync(path.join(tmpdir(), "partita-encode-design-"));
    const memory = (limitBytes: number): MemorySettings => ({ limitBytes, scratchDirectory });
    // One-hot columns: the design is written anew beside the values read (79 rows, 5 columns + 1).
    const csv = MIXED_CSV;
    const expected = await encode(csv);
    const bytes = (79 * 6 + 79 * expected.x.cols) * Float64Array.BYTES_PER_ELEMENT;
    const within = await encodeDesign(await readRaw(csv), undefined, {
      memory: memory(measureLimitForRows(bytes)),
    });
    expect(isDesignOnDisk(within)).toBe(false);
    expect(valuesOf(within)).toEqual(Array.from(expected.x.data));
    const beyond = await encodeDesign(await readRaw(csv), undefined, {
      memory: memory(measureLimitForRows(bytes) - 1),
    });
    expect(isDesignOnDisk(beyond)).toBe(true);
    expect(beyond.x.rows).toBe(79);
    expect(beyond.x.cols).toBe(expected.x.cols);
    expect(beyond.featureNames).toEqual(expected.featureNames);
    expect(valuesOf(beyond)).toEqual(Array.from(expected.x.data));
    expect(readdirSync(scratchDirectory)).toEqual([]);
    // All-numeric columns are standardized where they were read: no second copy, so no scratch file.
    const numeric = "a,label,shard\n1,x,p\n2,y,q\n4,x,p\n";
    const inPlace = await encodeDesign(await readRaw(numeric), undefined, { memory: memory(1) });
    expect(isDesignOnDisk(inPlace)).toBe(false);
    expect(valuesOf(inPlace)).toEqual(Array.from((await encode(numeric)).x.data));
  });
});

describe("the task and the label (methods.md §1, §4)", () => {
  const numericLabels = (distinct: number) =>
    `x,label,shard\n${Array.from({ length: 42 }, (_, i) => `${i % 5},${i % distinct},s${i % 2}`).join("\n")}\n`;

  it("classifies a numeric label with at most 20 values and regresses on more", async () => {
    expect(MAX_CLASSES_FOR_NUMERIC_LABEL).toBe(20);
    expect((await encode(numericLabels(20))).task).toBe("classification");
    const regression = await encode(numericLabels(21));
    expect(regression.task).toBe("regression");
    expect(regression.classes).toBeNull();
    expect(regression.labels).toBeNull();
    expect((await encode(numericLabels(21), {}, { task: "classification" })).classes).toHaveLength(
      21,
    );
    expect((await encode(numericLabels(2), {}, { task: "regression" })).task).toBe("regression");
    // Text labels are classes whatever their count.
    expect((await encode("x,label,shard\n1,a,s\n2,b,s\n")).task).toBe("classification");
  });

  it("standardizes the target and bins it into deciles like numpy.quantile, with each bin's range", async () => {
    const random = seeded(17);
    const values = Array.from({ length: 60 }, (_, i) =>
      i < 12 ? 5 : Number((random() * 40 - 10).toFixed(3)),
    );
    const csv = `x,label,shard\n${values.map((y, i) => `${i % 7},${y},${["b", "a"][i % 2]}`).join("\n")}\n`;
    const design = await encode(csv);
    const reference = runPythonJson<{ targets: number[]; bins: number[]; ranges: number[][] }>(
      `import sys, json
import numpy as np
y = np.array(json.load(sys.stdin)); order = np.argsort(np.array([["b","a"][i % 2] for i in range(len(y))]), kind="stable")
t = ((y - y.mean()) / y.std())[order]
cuts = np.quantile(t, np.arange(1, 10) / 10)
raw = (t[:, None] > cuts[None, :]).sum(1)
used = sorted(set(raw.tolist()))
print(json.dumps({"targets": t.tolist(), "bins": [used.index(b) for b in raw],
  "ranges": [[float(y[order][raw == b].min()), float(y[order][raw == b].max())] for b in used]}))`,
      values,
    );
    expectClose(design.targets ?? [], reference.targets, 1e-12);
    expect(Array.from(design.skewCategories)).toEqual(reference.bins);
    expect(design.skewCategoryCount).toBe(reference.ranges.length);
    expect(design.skewCategoryRanges).toEqual(reference.ranges);
  });

  it("bins labels 1…10 one per decile, and equal labels into one bin", () => {
    const { categories, count } = binIntoDeciles(
      Float64Array.from({ length: 10 }, (_, k) => k + 1),
    );
    expect(count).toBe(10);
    expect(Array.from(categories)).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8, 9]);
    const flat = binIntoDeciles(Float64Array.from([2, 2, 2, 9]));
    expect(flat.count).toBe(2);
    expect(Array.from(flat.categories)).toEqual([0, 0, 0, 1]);
  });

  it("refuses a single class, a text label to regress on and a constant target", async () => {
    await expect(encode("x,label,shard\n1,a,s\n2,a,t\n")).rejects.toThrow(
      'data.csv, column "label": the label has a single class ("a") (expected at least two classes)',
    );
    await expect(
      encode("x,label,shard\n1,3,s\n2,three,t\n", {}, { task: "regression" }),
    ).rejects.toThrow(
      'data.csv, data row 1 (0-based, header excluded; line 3), column "label": regression needs a numeric label, found "three" (expected a number)',
    );
    await expect(
      encode("x,label,shard\n1,3,s\n2,3,t\n", {}, { task: "regression" }),
    ).rejects.toThrow(
      'data.csv, column "label": the label is constant (expected a label that varies)',
    );
    expect(MIN_FEATURE_STD).toBe(1e-12);
  });
});

describe("columns that cannot be used as they are (methods.md §1)", () => {
  const withBadValues = (bad: string[], decimal = ".") =>
    `x;label;shard\n${[...Array.from({ length: 200 }, (_, i) => `${i}${decimal}5`), ...bad]
      .map((x, i) => `${x};${i % 2 ? "a" : "b"};s${i % 3}`)
      .join("\n")}\n`;

  it("names a numeric column's bad values, or counts them as missing when chosen", async () => {
    await expect(encode(withBadValues(["abc"]))).rejects.toThrow(
      'data.csv, data row 200 (0-based, header excluded; line 202), column "x": 1 of the column\'s 201 values are not numbers although the rest are ("abc" in data row 200) (expected finite numbers with a decimal point or a missing-value token (empty, NA, N/A, NaN, null, None); or choose to treat such values as missing)',
    );
    await expect(encode(withBadValues(["u", "v", "Inf", "w", "x", "y"], ","))).rejects.toThrow(
      '6 of the column\'s 206 values are not numbers although the rest are ("u" in data row 200, "v" in data row 201, "Inf" in data row 202, "w" in data row 203, "x" in data row 204, …) (expected finite numbers with a decimal comma',
    );
    const counted = await encode(withBadValues(["abc", "NA"]), {}, { badNumbersAsMissing: true });
    expect(counted.badNumbersCountedMissing).toEqual([{ column: "x", count: 1 }]);
    // Imputed with the mean of the 200 numbers: standardized to 0 (row 200 is in shard s2, the last).
    expect(counted.x.data[counted.x.data.length - 2]).toBeCloseTo(0, 14);
  });

  it("leaves out a text column with more than 32 levels, or refuses it when the user named it", async () => {
    const csv = `t,x,label,shard\n${Array.from({ length: 40 }, (_, i) => `w${i},${i},${i % 2},s${i % 2}`).join("\n")}\n`;
    const design = await encode(csv);
    expect(design.featureNames).toEqual(["x"]);
    expect(design.omittedColumns).toEqual([{ column: "t", reason: "too-many-levels" }]);
    expect(design.warnings).toEqual([
      'column "t" is not numeric and has more than 32 distinct values; it was left out',
    ]);
    await expect(encode(csv, { features: ["t", "x"] })).rejects.toThrow(
      'data.csv, data row 0 (0-based, header excluded; line 2), column "t": the feature is not numeric ("w0") and has more than 32 distinct values (expected numbers, or at most 32 distinct categories)',
    );
    // 32 levels are still encoded.
    const levels = `t,label,shard\n${Array.from({ length: 64 }, (_, i) => `w${i % 32},${i % 2},s${i % 2}`).join("\n")}\n`;
    expect((await encode(levels)).featureNames).toHaveLength(32);
  });

  it("drops a level every kept row has, and warns when only the bias is left", async () => {
    const design = await encode("k,c,label,shard\na,1,x,s\na,1,y,t\n");
    expect(design.featureNames).toEqual([]);
    expect(design.omittedColumns).toEqual([
      { column: "k=a", reason: "constant" },
      { column: "c", reason: "constant" },
    ]);
    expect(design.warnings).toEqual(["no usable feature columns: the model has only the bias"]);
    expect(Array.from(design.x.data)).toEqual([1, 1]);
  });
});

// Last in the file: scikit-learn takes seconds to load, and a mutation run stops at the first
// failing test, so the quick checks above go first.
describe("encoding the design (methods.md §1) against pandas and scikit-learn", () => {
  it("imputes, one-hot encodes, standardizes, appends the bias and groups rows by shard", async () => {
    const design = await encode(MIXED_CSV);
    const reference = preprocessReference("mixed");
    expect(design.featureNames).toEqual(reference.names);
    expect(design.shardIds).toEqual(reference.shards);
    expect(Array.from(design.shardOffsets)).toEqual([...reference.offsets, 79]);
    expect(design.classes).toEqual(reference.classes);
    expect(Array.from(design.labels ?? [])).toEqual(reference.labels);
    expect(design.skewCategories).toBe(design.labels);
    expect(design.skewCategoryCount).toBe(3);
    expect(design.targets).toBeNull();
    expect(design.task).toBe("classification");
    expect(design.x.rows).toBe(79);
    expect(design.x.cols).toBe(reference.names.length + 1);
    expectClose(design.x.data, reference.x, 1e-12);
    expect(design.omittedColumns).toEqual([
      { column: "flat", reason: "constant" },
      { column: "empty", reason: "all-missing" },
    ]);
    expect(design.warnings).toEqual(['column "empty" has no values and was left out']);
    expect("skewCategoryRanges" in design).toBe(false);
    expect(design.droppedRowsMissingLabel).toBe(1);
    expect(design.droppedRowsUnassigned).toBe(0);
    expect(design.badNumbersCountedMissing).toEqual([]);
  });

  it("standardizes all-numeric columns in place with the same result, rows regrouped", async () => {
    const csv = NUMERIC_CSV;
    const design = await encode(csv);
    const reference = preprocessReference("numeric");
    expect(design.featureNames).toEqual(["a", "b"]);
    expect(Array.from(design.shardOffsets)).toEqual([...reference.offsets, 50]);
    expect(Array.from(design.labels ?? [])).toEqual(reference.labels);
    expectClose(design.x.data, reference.x, 1e-12);
    // Named features: the same columns, one left out, encoded anew.
    const chosen = await encode(csv, { features: ["b"] });
    const width = design.x.cols;
    expect(chosen.featureNames).toEqual(["b"]);
    expectClose(
      chosen.x.data,
      Array.from({ length: 100 }, (_, k) => design.x.data[Math.floor(k / 2) * width + (k % 2) + 1]),
      1e-15,
    );
  });

  it("writes the design anew when a one-hot level stands where a feature column was read", async () => {
    const design = await encode(ONE_LEVEL_CSV);
    const reference = preprocessReference("one-level");
    expect(design.featureNames).toEqual(["t=on", "x"]);
    expect(design.featureNames).toEqual(reference.names);
    expect(Array.from(design.shardOffsets)).toEqual([...reference.offsets, 40]);
    expectClose(design.x.data, reference.x, 1e-12);
  });

  it("puts the design in shared memory, so pass threads read it without a copy", async () => {
    // Written anew (one-hot columns) and standardized in place (numbers only).
    for (const csv of [MIXED_CSV, NUMERIC_CSV]) {
      expect((await encode(csv)).x.data.buffer).toBeInstanceOf(SharedArrayBuffer);
    }
  });

  it("writes a one-hot design of several 512-row blocks as NumPy computes it", async () => {
    const rows = 1300;
    const lines = Array.from(
      { length: rows },
      (_, i) => `${["a", "b", "c"][i % 3]},${(i * 7) % 11},${i % 2},s${(i * 5) % 3}`,
    );
    const csv = `k,x,label,shard\n${lines.join("\n")}\n`;
    const design = await encode(csv);
    // Outside reference: one-hot columns and x standardized with the population deviation (NumPy's
    // default ddof=0), the bias appended, rows grouped by shard keeping their order (a stable sort).
    const reference = runPythonJson<number[]>(
      `import sys, json
import numpy as np
n = json.load(sys.stdin); i = np.arange(n)
k = i % 3; shard = (i * 5) % 3
X = np.column_stack([(k == 0), (k == 1), (k == 2), (i * 7) % 11]).astype(float)
X = (X - X.mean(0)) / X.std(0)
X = np.column_stack([X[:, :3], X[:, 3], np.ones(n)])[np.argsort(shard, kind="stable")]
print(json.dumps(X.ravel().tolist()))`,
      rows,
    );
    expect(design.featureNames).toEqual(["k=a", "k=b", "k=c", "x"]);
    expectClose(design.x.data, reference, 1e-12);
  });

  it("keeps rows in file order when they already are grouped by shard", async () => {
    const csv = "x,label,shard\n1,a,p\n3,b,p\n2,a,q\n6,b,q\n";
    const design = await encode(csv);
    const std = Math.sqrt(((1 - 3) ** 2 + 0 + (2 - 3) ** 2 + (6 - 3) ** 2) / 4);
    expect(Array.from(design.x.data)).toEqual(
      [1, 3, 2, 6].flatMap((value) => [(value - 3) / std, 1]),
    );
  });

  it("one-hot encodes by level codes from the accumulator, across shard regrouping", async () => {
    const csv = "k,label,shard\nb,x,s2\na,y,s1\nb,x,s1\n,y,s2\n";
    const design = await encode(csv);
    expect(design.featureNames).toEqual(["k=a", "k=b"]);
    // Column k=a: mean 1/4, deviation √(3/16); k=b: mean 1/2, deviation 1/2. Rows s1: a, b; s2: b, missing.
    const high = (mean: number) => (1 - mean) / Math.sqrt(mean * (1 - mean));
    const low = (mean: number) => -mean / Math.sqrt(mean * (1 - mean));
    expectClose(
      design.x.data,
      [
        high(0.25),
        low(0.5),
        1,
        low(0.25),
        high(0.5),
        1,
        low(0.25),
        high(0.5),
        1,
        low(0.25),
        low(0.5),
        1,
      ],
      1e-15,
    );
    expect(Array.from(design.labels ?? [])).toEqual([1, 0, 0, 1]);
  });
});
