import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import {
  ClientPasses,
  combineEvaluationSums,
  combineGradientDigests,
  combineSchemaDigests,
  computeGradientDigest,
  computeSchemaDigest,
  encodeClientRows,
  findColumnsNeedingAllRows,
  mergeSchemaDigests,
  readClientRows,
  type DigestEncoding,
  type EvaluationRequest,
  type MeasurementRequest,
  type SchemaDigest,
} from "@/lib/analysis/digests";
import type { RawDataset } from "@/lib/analysis/read-dataset";
import type { Task } from "@/lib/analysis/design";
import { loadPenguinsCsv, loadPenguinsRecords } from "../support/open-data";

// The identity behind one analysis in parts (methods.md §9): every digest quantity is a count, a
// sum, a minimum, a maximum or a second moment merged by Chan's update, so the digests of the parts
// of a file, combined shard by shard, equal the digest of the whole file — here the vega-datasets
// penguins cut into three runs of rows, so each island's shard spans parts.

// The first part holds 15 Torgersen penguins: fewer than 21 distinct flipper lengths.
const CUTS = [0, 15, 190, 344];

/** The penguins CSV's lines: the header, then one line per row. */
function penguinsLines(): string[] {
  return loadPenguinsCsv().csv.trimEnd().split("\n");
}

/** Data rows [from, to) of CSV lines as a CSV of their own. */
function csvRows([header, ...lines]: string[], from: number, to: number): string {
  return `${[header, ...lines.slice(from, to)].join("\n")}\n`;
}

function readRows(csv: string, labelColumn: string, shardColumn: string) {
  return readClientRows({
    data: Readable.from([Buffer.from(csv, "utf8")]),
    dataName: "penguins.csv",
    columns: { labelColumn, shardColumn, idColumn: "row" },
  });
}

interface PartsSource {
  /** The file's lines (default: the penguins). */
  lines?: string[];
  /** The parts' first rows, then the end: the whole file is the rows from the first to the end. */
  cuts?: number[];
  shardColumn?: string;
}

async function partsAndWhole(
  labelColumn: string,
  task?: Task,
  { lines = penguinsLines(), cuts = CUTS, shardColumn = "Island" }: PartsSource = {},
) {
  const partRaws = await Promise.all(
    cuts.slice(1).map((to, k) => readRows(csvRows(lines, cuts[k], to), labelColumn, shardColumn)),
  );
  const wholeRaw = await readRows(
    csvRows(lines, cuts[0], cuts[cuts.length - 1]),
    labelColumn,
    shardColumn,
  );
  // A part may hold a shard's few rows: the minimum applies to the combined shard.
  // Parts of one dataset also count each column's numbers and other values (§1's 95% rule).
  const options = { client: "part", task, minimumShardRows: 1, countValueKinds: true };
  return {
    partRaws,
    wholeRaw,
    parts: partRaws.map((raw) => computeSchemaDigest(raw, options)),
    whole: computeSchemaDigest(wholeRaw, { ...options, client: "whole" }),
  };
}

/**
 * Equal, numbers within 1e-12 relative of the larger (counts and extremes are exact alike); a vector
 * (an array of numbers) relative to its largest entry, as a vector is compared.
 */
function expectSame(actual: unknown, expected: unknown, path = "", vectorScale = 0): void {
  if (typeof expected === "number") {
    const scale = Math.max(Math.abs(expected), Math.abs(actual as number), vectorScale);
    expect(Math.abs((actual as number) - expected), path).toBeLessThanOrEqual(1e-12 * scale);
  } else if (Array.isArray(expected)) {
    expect((actual as unknown[]).length, path).toBe(expected.length);
    const numbers = expected.every((item) => typeof item === "number");
    const scale = numbers ? Math.max(0, ...expected.map((item: number) => Math.abs(item))) : 0;
    expected.forEach((item, k) =>
      expectSame((actual as unknown[])[k], item, `${path}[${k}]`, scale),
    );
  } else if (expected !== null && typeof expected === "object") {
    expect(Object.keys(actual as object).sort(), path).toEqual(Object.keys(expected).sort());
    for (const [key, item] of Object.entries(expected)) {
      expectSame((actual as Record<string, unknown>)[key], item, `${path}.${key}`);
    }
  } else {
    expect(actual, path).toBe(expected);
  }
}

/** Shards in one order, for a comparison that does not depend on which part saw one first. */
function byShard<Digest extends { shards: { id: string }[] }>(digest: Digest): Digest {
  return { ...digest, shards: [...digest.shards].sort((a, b) => a.id.localeCompare(b.id)) };
}

/**
 * The combined digest without the level counts of the columns the whole file stopped counting
 * (more than 32 distinct values in all its rows): the parts each counted theirs, and the combined
 * digest keeps them so a text column can be judged over all rows (`findColumnsNeedingAllRows`).
 */
function withoutUncounted(combined: SchemaDigest, whole: SchemaDigest): SchemaDigest {
  const counted = whole.features.map((_, k) =>
    whole.shards.every((s) => s.columns[k].levels !== null),
  );
  return {
    ...combined,
    shards: combined.shards.map((shard) => ({
      ...shard,
      columns: shard.columns.map((column, k) =>
        counted[k] ? column : { ...column, levels: null },
      ),
    })),
  };
}

/** Passes over each part's rows and over the whole file's, all closed after `check`. */
async function withPasses(
  partRaws: RawDataset[],
  wholeRaw: RawDataset,
  encoding: DigestEncoding,
  check: (partPasses: ClientPasses[], wholePasses: ClientPasses) => void,
): Promise<void> {
  const partPasses = partRaws.map((raw) => new ClientPasses(encodeClientRows(raw, encoding), 1));
  const wholePasses = new ClientPasses(encodeClientRows(wholeRaw, encoding), 1);
  try {
    check(partPasses, wholePasses);
  } finally {
    await Promise.all([...partPasses, wholePasses].map((passes) => passes.close()));
  }
}

/** The parts' round-2 digests, combined, equal the whole file's shard by shard. */
function expectGradientsAddUp(
  partPasses: ClientPasses[],
  wholePasses: ClientPasses,
  encoding: DigestEncoding,
  request: MeasurementRequest,
) {
  const combined = combineGradientDigests(
    "whole",
    partPasses.map((passes) => computeGradientDigest("part", passes, encoding, request)),
  );
  expectSame(
    byShard(combined),
    byShard(computeGradientDigest("whole", wholePasses, encoding, request)),
  );
}

describe("digests of a file's parts combined (methods.md §9)", () => {
  it("schema: the parts' digests combine into the whole file's, counts, moments, extremes and levels", async () => {
    const { parts, whole } = await partsAndWhole("Species");
    // Each island appears in more than one part.
    expect(parts.filter((part) => part.shards.some((shard) => shard.id === "Dream")).length).toBe(
      2,
    );
    const combined = combineSchemaDigests("whole", parts, undefined);
    expectSame(byShard(withoutUncounted(combined, whole)), byShard(whole));
    // Numeric columns with more than 32 values over all rows: the parts' counts are kept.
    expect(
      whole.shards[0].columns.filter((column) => column.levels === null).length,
    ).toBeGreaterThan(0);
  });

  it("schema with a numeric label: level counts dropped when the whole has more than 20 values though a part has fewer", async () => {
    const { parts, whole } = await partsAndWhole("Flipper Length (mm)");
    expect(parts[0].shards.every((shard) => shard.label.levels !== null)).toBe(true);
    expect(whole.shards.every((shard) => shard.label.levels === null)).toBe(true);
    expectSame(
      byShard(withoutUncounted(combineSchemaDigests("whole", parts, undefined), whole)),
      byShard(whole),
    );
    // Classification fixed by the analysis: the counts are kept, as one client keeps them.
    const forced = await partsAndWhole("Flipper Length (mm)", "classification");
    expectSame(
      byShard(
        withoutUncounted(
          combineSchemaDigests("whole", forced.parts, "classification"),
          forced.whole,
        ),
      ),
      byShard(forced.whole),
    );
    // A part whose labels hold a word: by methods.md §1 the label is then not numeric.
    const withWord = [parts[0], { ...parts[1], labelNumeric: false }, parts[2]];
    expect(combineSchemaDigests("whole", withWord, undefined).labelNumeric).toBe(false);
  });

  it("schema with a numeric label: level counts as the whole file has them, whether every part counted or one stopped", async () => {
    // The vega-datasets flipper lengths: rows 0–19 (all of Torgersen's there) hold 13 distinct
    // values and rows 20–49 18, so both parts count; rows 20–67 hold 22, past the 20 a client
    // counts. Rows 0–49 (22 values) and rows 0–67 (24) are past it as a whole.
    for (const cuts of [
      [0, 20, 50],
      [0, 20, 68],
    ]) {
      const { parts, whole } = await partsAndWhole("Flipper Length (mm)", undefined, { cuts });
      const counted = parts.map((part) =>
        part.shards.every((shard) => shard.label.levels !== null),
      );
      expect(counted).toEqual([true, cuts[2] === 50]);
      expect(whole.shards.every((shard) => shard.label.levels === null)).toBe(true);
      expectSame(
        byShard(withoutUncounted(combineSchemaDigests("whole", parts, undefined), whole)),
        byShard(whole),
      );
    }
  });

  it("schema: a part with no values of a column in a shard's rows, and a shard with none at all", async () => {
    // The vega-datasets penguins of rows 3 and 339 have no measurements. Row 3 gets a colony of
    // its own ("Unmeasured"); row 339, on Biscoe, is a part of its own.
    const records = loadPenguinsRecords();
    const [header, ...lines] = penguinsLines();
    const withColonies = [
      `${header},Colony`,
      ...lines.map((line, i) => `${line},${i === 3 ? "Unmeasured" : records[i].Island}`),
    ];
    const { parts, whole } = await partsAndWhole("Species", undefined, {
      lines: withColonies,
      cuts: [0, 3, 4, 339, 340, 344],
      shardColumn: "Colony",
    });
    const beak = whole.features.indexOf("Beak Length (mm)");
    expect(parts[3].shards.map((shard) => [shard.id, shard.columns[beak].present])).toEqual([
      ["Biscoe", 0],
    ]);
    const unmeasured = whole.shards.find((shard) => shard.id === "Unmeasured")!;
    expect(unmeasured.columns[beak]).toMatchObject({ present: 0, sum: null });
    expectSame(
      byShard(withoutUncounted(combineSchemaDigests("whole", parts, undefined), whole)),
      byShard(whole),
    );
  });

  it("schema: a column numeric in one part and not in another is not numeric; counts of a part that could not count are null", async () => {
    const { parts } = await partsAndWhole("Species");
    const sex = parts[1].features.indexOf("Sex");
    const numericHere = {
      ...parts[1],
      columnsNumeric: parts[1].columnsNumeric.map((numeric, k) => numeric || k === sex),
      shards: parts[1].shards.map((shard) => ({
        ...shard,
        columns: shard.columns.map((column, k) =>
          k === sex ? { ...column, levels: null } : column,
        ),
      })),
    };
    const combined = combineSchemaDigests("whole", [parts[0], numericHere, parts[2]], undefined);
    expect(combined.columnsNumeric[sex]).toBe(false);
    const dream = combined.shards.find((shard) => shard.id === "Dream")!;
    expect(dream.columns[sex].levels).toBeNull();
    expect(dream.columns[sex].sum).toBeNull();
    expect(combined.totalRows).toBe(344);

    // A numeric column read as text in one part (a word among its values there): by methods.md §1
    // not numeric over all rows, so no sums, though the other parts sent theirs.
    const beak = parts[0].features.indexOf("Beak Length (mm)");
    const textHere = {
      ...parts[0],
      columnsNumeric: parts[0].columnsNumeric.map((numeric, k) => numeric && k !== beak),
      shards: parts[0].shards.map((shard) => ({
        ...shard,
        columns: shard.columns.map((column, k) =>
          k === beak
            ? { ...column, sum: null, sumSquaredDeviations: null, min: null, max: null }
            : column,
        ),
      })),
    };
    const mixed = combineSchemaDigests("whole", [textHere, parts[1], parts[2]], undefined);
    const torgersen = mixed.shards.find((shard) => shard.id === "Torgersen")!;
    expect(mixed.columnsNumeric[beak]).toBe(false);
    expect(torgersen.columns[beak]).toMatchObject({ sum: null, min: null, max: null });

    // The counts of numbers and other values judge §1's 95% share over all rows: a part that did
    // not count them (a client's digest leaves them out) leaves the whole without them.
    const uncounted = { ...parts[2], columnsValueKinds: undefined };
    for (const order of [
      [uncounted, parts[1], parts[0]],
      [parts[0], parts[1], uncounted],
    ]) {
      expect(combineSchemaDigests("whole", order, undefined).columnsValueKinds).toBeUndefined();
    }
  });

  it("gradients and evaluations: the parts' sums add up to the whole file's", async () => {
    const { partRaws, wholeRaw, whole } = await partsAndWhole("Species");
    const encoding = mergeSchemaDigests([whole]);
    const width = encoding.columns.length + 1;
    const point = (scale: number) =>
      Array.from({ length: 3 }, (_, c) =>
        Array.from({ length: width }, (_, j) => scale * Math.sin(2 + 3 * c + j)),
      );
    const request: MeasurementRequest = {
      encodingHash: encoding.hash,
      reference: "given",
      referenceWeights: point(0.3),
      pathEnd: point(0.8),
    };
    const evaluation: EvaluationRequest = {
      encodingHash: encoding.hash,
      weights: point(0.5).flat(),
      sample: null,
      hessian: true,
    };
    await withPasses(partRaws, wholeRaw, encoding, (partPasses, wholePasses) => {
      expectGradientsAddUp(partPasses, wholePasses, encoding, request);
      expectSame(
        combineEvaluationSums(partPasses.map((passes) => passes.evaluate(evaluation))),
        wholePasses.evaluate(evaluation),
      );
      const withoutHessian = { ...evaluation, hessian: false };
      expect(
        combineEvaluationSums(partPasses.map((passes) => passes.evaluate(withoutHessian)))
          .hessianSum,
      ).toBeNull();
    });
  });

  it("regression: the target histograms of the parts add up cell by cell", async () => {
    const { partRaws, wholeRaw, whole } = await partsAndWhole("Body Mass (g)", "regression");
    const encoding = mergeSchemaDigests([whole], { task: "regression" });
    const width = encoding.columns.length + 1;
    const weights = [Array.from({ length: width }, (_, j) => 0.1 * j)];
    const request: MeasurementRequest = {
      encodingHash: encoding.hash,
      reference: "zero",
      referenceWeights: weights,
      pathEnd: weights,
    };
    await withPasses(partRaws, wholeRaw, encoding, (partPasses, wholePasses) =>
      expectGradientsAddUp(partPasses, wholePasses, encoding, request),
    );
  });
});

describe("columns only a read of all rows can judge (methods.md §1's 95% rule)", () => {
  it("lists a column mixing numbers with other tokens, or whose levels a part did not count", () => {
    const shard = (levels: (Record<string, number> | null)[]) => ({
      id: "a",
      rows: 10,
      label: { sum: null, sumSquaredDeviations: null, min: null, max: null, levels: { x: 10 } },
      columns: levels.map((counts) => ({
        present: 10,
        sum: null,
        sumSquaredDeviations: null,
        min: null,
        max: null,
        levels: counts,
      })),
    });
    const schema = {
      features: ["numbers", "mixed", "text", "uncounted", "spelled"],
      columnsNumeric: [true, false, false, false, false],
      shards: [
        shard([{ "1": 10 }, { "1.5": 4, abc: 6 }, { x: 10 }, null, { Inf: 2, "2": 8 }]),
        shard([{ "2": 10 }, { "7": 10 }, { y: 10 }, { z: 10 }, { "3": 10 }]),
      ],
    } as unknown as SchemaDigest;
    // "Inf" is not a finite number (methods.md §1): that column mixes numbers and another token.
    expect(findColumnsNeedingAllRows(schema)).toEqual(["mixed", "uncounted", "spelled"]);
  });
});

describe("columns only a read of all rows can judge, from the parts' counts of numbers and other values", () => {
  // Methods.md §1: a column where at least 95% of the non-missing values parse as finite numbers
  // but some do not is a numeric column with bad values (an error naming its first rows, which only
  // a read of all rows has); any other non-numeric column is a category, or left out past 32
  // distinct values — which the parts' merged digest decides as one process does.
  const column = (levels: Record<string, number> | null) => ({
    present: 100,
    sum: null,
    sumSquaredDeviations: null,
    min: null,
    max: null,
    levels,
  });
  const schemaOf = (featuresNamed: boolean) =>
    ({
      features: [
        "bad-numbers",
        "mostly-text",
        "many-words",
        "mixed-category",
        "many-named",
        "many-numbers",
        "32-words",
      ],
      featuresNamed,
      columnsNumeric: [false, false, false, false, false, true, false],
      columnsValueKinds: [
        { numbers: 95, others: 5 },
        { numbers: 94, others: 6 },
        { numbers: 0, others: 100 },
        { numbers: 50, others: 50 },
        { numbers: 0, others: 100 },
        { numbers: 100, others: 0 },
        { numbers: 0, others: 100 },
      ],
      shards: [
        {
          id: "a",
          rows: 100,
          label: {
            sum: null,
            sumSquaredDeviations: null,
            min: null,
            max: null,
            levels: { x: 100 },
          },
          columns: [
            column(null),
            column(null),
            column(null),
            column({ "1": 50, b: 50 }),
            column(Object.fromEntries(Array.from({ length: 33 }, (_, k) => [`w${k}`, 3]))),
            // A numeric column's levels are not counted past 32 values: its numbers judge it.
            column(null),
            // At most 32 distinct values are one-hot encoded (methods.md §1), named or not.
            column(Object.fromEntries(Array.from({ length: 32 }, (_, k) => [`w${k}`, 3]))),
          ],
        },
      ],
    }) as unknown as SchemaDigest;

  it("needs every row only for a numeric column with bad values (95% or more numbers)", () => {
    // 95 of 100 is exactly the share; 94 of 100 is under it, a text column (left out past 32
    // values, as "many-words" and "many-named" are), and a category mixing a number and a word
    // is one-hot encoded by its counted levels.
    expect(findColumnsNeedingAllRows(schemaOf(false))).toEqual(["bad-numbers"]);
  });

  it("needs every row for a named feature past 32 distinct values, whose error names its first row", () => {
    expect(findColumnsNeedingAllRows(schemaOf(true))).toEqual([
      "bad-numbers",
      "mostly-text",
      "many-words",
      "many-named",
    ]);
  });
});
