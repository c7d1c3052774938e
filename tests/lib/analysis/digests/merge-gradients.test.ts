import { describe, expect, it } from "vitest";
import {
  analyzeFromDigests,
  createMeasurementRequest,
  mergeGradientDigests,
  mergeSchemaDigests,
  type GradientDigest,
  type LocalDigestClient,
} from "@/lib/analysis/digests";
import type { ReferenceWeights } from "@/lib/validation/analysis-options";
import { analyzeText } from "../support/analyze-text";
import { loadPenguinsCsv } from "../support/open-data";
import { compareSummaries, createTextClient, splitAmongClients } from "./support";

// The coordinator's merge of round 2 (methods.md §9) on its own: the defining identity of §9 (the
// merged digests give the central analysis's summary of the same rows to 1e-9 relative; the
// central analysis is itself checked against NumPy, SciPy and scikit-learn elsewhere) on the
// vega-datasets penguins with a seeded 6-shard column, and the refusals of digests that do not
// belong together.

const PLAN = { localSteps: 10, rounds: 100, batchSize: 32 };

/**
 * The penguins with a shard column (the row number mod 6; whole shards dealt to clients) and an
 * invented text column of 40 distinct values, which both sides leave out as having too many.
 */
function penguinsCsv(): string {
  const [header, ...lines] = loadPenguinsCsv().csv.trimEnd().split("\n");
  const rows = lines.map((line, i) => `${line},p${i % 6},k${i % 40}`);
  return `${[`${header},shard,code`, ...rows].join("\n")}\n`;
}

async function clientsFor(labelColumn: string, count: number): Promise<LocalDigestClient[]> {
  const columns = { labelColumn, shardColumn: "shard", idColumn: "row" };
  const parts = splitAmongClients(penguinsCsv(), "shard", count, 5);
  return Promise.all(
    parts.map((part, c) => createTextClient(`client-${c + 1}`, part, columns, { threads: 1 })),
  );
}

async function withClients<Result>(
  labelColumn: string,
  count: number,
  body: (clients: LocalDigestClient[]) => Promise<Result>,
): Promise<Result> {
  const clients = await clientsFor(labelColumn, count);
  try {
    return await body(clients);
  } finally {
    await Promise.all(clients.map((client) => client.close()));
  }
}

describe("the merged summary equals the central analysis (methods.md §9)", () => {
  it("softmax, 3 clients, a supplied reference point off the optimum", async () => {
    const csv = penguinsCsv();
    const columns = { labelColumn: "Species", shardColumn: "shard", idColumn: "row" };
    const optimum = await analyzeText(csv, columns);
    const supplied: ReferenceWeights = {
      ...optimum.model.optimum,
      weights: optimum.model.optimum.weights.map((row) => row.map((v, j) => 0.5 * v - 0.02 * j)),
    };
    const central = await analyzeText(csv, { ...columns, reference: supplied });
    const merged = await withClients("Species", 3, (clients) =>
      analyzeFromDigests(clients, { lambda: 1e-3, reference: supplied, plan: PLAN }),
    );
    expect(compareSummaries(central, merged, false)).toEqual([]);
    expect(merged.preprocessing.omittedColumns).toContainEqual({
      column: "code",
      reason: "too-many-levels",
    });
    expect(merged.model.optimizer.gradNorm).toBeLessThanOrEqual(merged.model.optimizer.tolerance);
    expect(merged.digests).toMatchObject({ fitted: true, labelSkewFromHistogram: false });
    expect(merged.digests?.clients.map((client) => client.shards.length)).toEqual([2, 2, 2]);
    expect(merged.digests?.clients.reduce((rows, client) => rows + client.rows, 0)).toBe(344);
  });

  it("least squares, 2 clients, at zero: equal but for the label skew from the 4096-cell histogram", async () => {
    const csv = penguinsCsv();
    const columns = { labelColumn: "Flipper Length (mm)", shardColumn: "shard", idColumn: "row" };
    const central = await analyzeText(csv, { ...columns, reference: "zero" });
    const merged = await withClients("Flipper Length (mm)", 2, (clients) =>
      analyzeFromDigests(clients, { lambda: 1e-3, reference: "zero", plan: PLAN }),
    );
    expect(compareSummaries(central, merged, true)).toEqual([]);
    expect(merged.digests?.labelSkewFromHistogram).toBe(true);
    expect(
      merged.preprocessing.warnings.some((warning) => warning.includes("4096-cell histogram")),
    ).toBe(true);
    // The histogram's bins move only rows of the cells that hold a cut point.
    expect(Math.abs(merged.labelSkew.tv - central.labelSkew.tv)).toBeLessThan(0.02);
  });
});

describe("refusing gradient digests that do not belong together (methods.md §9)", () => {
  it("names the client and shard, and what was expected", async () => {
    await withClients("Species", 2, async (clients) => {
      const schemas = await Promise.all(clients.map((client) => client.schema()));
      const encoding = mergeSchemaDigests(schemas);
      const request = createMeasurementRequest(encoding, "zero", null);
      const [first, second] = await Promise.all(
        clients.map((client) => client.gradients(encoding, request)),
      );
      const merge = (digests: GradientDigest[], participants?: number) =>
        mergeGradientDigests(encoding, digests, {
          lambda: 1e-3,
          plan: { ...PLAN, participants },
          missingClients: ["late"],
        });

      // Without a fit, the supplied point stands in for W*, and the report says so.
      const summary = merge([first, second]);
      expect(
        summary.preprocessing.warnings.some((warning) => warning.includes("without a fit")),
      ).toBe(true);
      expect(summary.model.optimizer).toMatchObject({
        converged: false,
        iterations: 0,
        evaluations: 0,
      });
      expect(summary.digests).toMatchObject({ fitted: false, missingClients: ["late"] });
      expect(summary.digests?.clients.map((client) => client.client)).toEqual([
        "client-1",
        "client-2",
      ]);

      expect(() => merge([])).toThrow("no gradient digests were given");
      expect(() => merge([first, { ...second, encodingHash: "0".repeat(64) }])).toThrow(
        'client "client-2" sent digests for encoding 000000000000…',
      );
      expect(() =>
        merge([first, { ...second, request: { ...second.request, encodingHash: "0".repeat(64) } }]),
      ).toThrow('client "client-2" sent digests for encoding');
      expect(() =>
        merge([first, { ...second, request: { ...request, reference: "given" } }]),
      ).toThrow('client "client-2" measured at other points than client "client-1"');
      expect(() => merge([first, { ...second, client: "client-1" }])).toThrow(
        'client "client-1" sent two gradient digests',
      );
      const stolen = {
        ...second,
        shards: [{ ...second.shards[0], id: first.shards[0].id }, ...second.shards.slice(1)],
      };
      expect(() => merge([first, stolen])).toThrow(
        `shard "${first.shards[0].id}" was sent twice (by client "client-1" and by client "client-2")`,
      );
      const small = {
        ...second,
        shards: [{ ...second.shards[0], rows: 9 }, ...second.shards.slice(1)],
      };
      expect(() => merge([first, small])).toThrow(
        `client "client-2", shard "${second.shards[0].id}" has 9 rows, under the minimum of 10`,
      );
      expect(() => merge([first])).toThrow(
        `the gradient digests cover ${first.shards.length} shards and ${first.shards.reduce((n, s) => n + s.rows, 0)} rows, round 1 had 6 shards and 344 rows`,
      );
      // The rows of round 1 in 7 shards, then 6 shards with one row more.
      const [head, ...rest] = second.shards;
      const split = {
        ...second,
        shards: [{ ...head, rows: 20 }, { ...head, id: "extra", rows: head.rows - 20 }, ...rest],
      };
      expect(() => merge([first, split])).toThrow(
        "cover 7 shards and 344 rows, round 1 had 6 shards",
      );
      const grown = { ...second, shards: [{ ...head, rows: head.rows + 1 }, ...rest] };
      expect(() => merge([first, grown])).toThrow("cover 6 shards and 345 rows");
      const shorter = {
        ...second,
        shards: [
          { ...second.shards[0], alongPath: second.shards[0].alongPath.slice(1) },
          ...second.shards.slice(1),
        ],
      };
      expect(() => merge([first, shorter])).toThrow(
        `client "client-2", shard "${second.shards[0].id}": the digest's sums have the wrong shape`,
      );
      const noNoise = {
        ...second,
        shards: [
          {
            ...second.shards[0],
            atReference: { ...second.shards[0].atReference, squaredGradientNormSum: null },
          },
          ...second.shards.slice(1),
        ],
      };
      expect(() => merge([first, noNoise])).toThrow("the digest's sums have the wrong shape");
      const narrow = {
        ...second,
        shards: [
          { ...second.shards[0], featureSums: second.shards[0].featureSums.slice(1) },
          ...second.shards.slice(1),
        ],
      };
      expect(() => merge([first, narrow])).toThrow("the digest's sums have the wrong shape");
      const shortGradient = {
        ...second,
        shards: [
          {
            ...second.shards[0],
            alongPath: second.shards[0].alongPath.map((sums, t) =>
              t === 4 ? { ...sums, gradientSum: sums.gradientSum.slice(1) } : sums,
            ),
          },
          ...second.shards.slice(1),
        ],
      };
      expect(() => merge([first, shortGradient])).toThrow("the digest's sums have the wrong shape");
      expect(() => merge([first, second], 7)).toThrow("the plan has 7 participants per round");
      expect(merge([first, second], 6).advice).toBeDefined();
    });
  });
});
