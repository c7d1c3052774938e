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
 * The penguins with a shard column (the row number mod 6; whole shards dealt to clients, none for
 * the rows in `unassigned`) and an invented text column of 40 distinct values, which both sides
 * leave out as having too many.
 */
function penguinsCsv(unassigned: ReadonlySet<number> = new Set()): string {
  const [header, ...lines] = loadPenguinsCsv().csv.trimEnd().split("\n");
  const rows = lines.map((line, i) => `${line},${unassigned.has(i) ? "" : `p${i % 6}`},k${i % 40}`);
  return `${[`${header},shard,code`, ...rows].join("\n")}\n`;
}

interface ClientsSetup {
  csv: string;
  labelColumn: string;
  count: number;
  dropUnassignedRows?: boolean;
}

async function withClients<Result>(
  { csv, labelColumn, count, dropUnassignedRows }: ClientsSetup,
  body: (clients: LocalDigestClient[]) => Promise<Result>,
): Promise<Result> {
  const columns = { labelColumn, shardColumn: "shard", idColumn: "row" };
  const parts = splitAmongClients(csv, "shard", count, 5);
  const clients = await Promise.all(
    parts.map((part, c) =>
      createTextClient(`client-${c + 1}`, part, columns, { threads: 1 }, { dropUnassignedRows }),
    ),
  );
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
    const merged = await withClients({ csv, labelColumn: "Species", count: 3 }, (clients) =>
      analyzeFromDigests(clients, { lambda: 1e-3, reference: supplied, plan: PLAN }),
    );
    expect(compareSummaries(central, merged, false)).toEqual([]);
    // The same notes as the central analysis (the left-out "code" column): W* was fitted and the
    // labels are classes, so neither the stand-in point nor the histogram is noted.
    expect(merged.preprocessing.warnings).toEqual(central.preprocessing.warnings);
    expect(merged.digests?.missingClients).toEqual([]);
    expect(merged.preprocessing.omittedColumns).toContainEqual({
      column: "code",
      reason: "too-many-levels",
    });
    expect(merged.model.optimizer.gradNorm).toBeLessThanOrEqual(merged.model.optimizer.tolerance);
    expect(merged.digests).toMatchObject({ fitted: true, labelSkewFromHistogram: false });
    expect(merged.digests?.clients.map((client) => client.shards.length)).toEqual([2, 2, 2]);
    expect(merged.digests?.clients.reduce((rows, client) => rows + client.rows, 0)).toBe(344);
  });

  it("least squares, 2 clients, at zero, 7 rows without a shard dropped: equal but for the label skew from the 4096-cell histogram", async () => {
    // Rows with a flipper length (methods.md §1: only a row with a label can be unassigned).
    const csv = penguinsCsv(new Set([7, 57, 107, 157, 207, 257, 307]));
    const labelColumn = "Flipper Length (mm)";
    const columns = { labelColumn, shardColumn: "shard", idColumn: "row" };
    const dropUnassignedRows = true;
    const central = await analyzeText(csv, { ...columns, reference: "zero", dropUnassignedRows });
    const merged = await withClients(
      { csv, labelColumn, count: 2, dropUnassignedRows },
      (clients) => analyzeFromDigests(clients, { lambda: 1e-3, reference: "zero", plan: PLAN }),
    );
    expect(compareSummaries(central, merged, true)).toEqual([]);
    expect(merged.preprocessing.droppedRowsUnassigned).toBe(7);
    expect(merged.digests?.labelSkewFromHistogram).toBe(true);
    const histogramNote = (warning: string) => warning.includes("4096-cell histogram");
    expect(merged.preprocessing.warnings.some(histogramNote)).toBe(true);
    expect(merged.preprocessing.warnings.filter((warning) => !histogramNote(warning))).toEqual(
      central.preprocessing.warnings,
    );
    // The decile bins partition each shard's rows: its counts are rows, and add up to them.
    merged.shards.forEach((shard, m) => {
      expect(shard.labelCounts.every((count) => count >= 0)).toBe(true);
      expect(shard.labelCounts.reduce((total, count) => total + count, 0)).toBe(
        central.shards[m].rows,
      );
    });
    // The histogram's bins move only rows of the cells that hold a cut point.
    expect(Math.abs(merged.labelSkew.tv - central.labelSkew.tv)).toBeLessThan(0.02);
  });
});

describe("refusing gradient digests that do not belong together (methods.md §9)", () => {
  it("names the client and shard, and what was expected", async () => {
    const csv = penguinsCsv();
    // The central analysis of the same rows, for the optimizer's tolerance (methods.md §2).
    const central = await analyzeText(csv, {
      labelColumn: "Species",
      shardColumn: "shard",
      idColumn: "row",
    });
    await withClients({ csv, labelColumn: "Species", count: 2 }, async (clients) => {
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

      // Without a fit, the supplied point stands in for W*, and the report says so; the tolerance
      // is still 1e-8·max(1, ‖∇F(0)‖) over all rows, as the central analysis states it.
      const summary = merge([first, second]);
      expect(
        summary.preprocessing.warnings.some((warning) => warning.includes("without a fit")),
      ).toBe(true);
      expect(summary.model.optimizer).toMatchObject({
        converged: false,
        iterations: 0,
        evaluations: 0,
      });
      const tolerance = central.model.optimizer.tolerance;
      expect(Math.abs(summary.model.optimizer.tolerance - tolerance)).toBeLessThan(
        1e-9 * tolerance,
      );
      expect(summary.digests).toMatchObject({ fitted: false, missingClients: ["late"] });
      expect(summary.digests?.clients.map((client) => client.client)).toEqual([
        "client-1",
        "client-2",
      ]);
      // Each client's shards in code-point order of their ids (methods.md §1), as sent or not.
      const ids = second.shards.map((shard) => shard.id);
      const reversed = { ...second, shards: [...second.shards].reverse() };
      expect(merge([first, reversed]).digests?.clients[1].shards).toEqual([...ids].sort());

      // Each refusal's whole message: the problem, then what was expected.
      expect(() => merge([])).toThrow(
        "no gradient digests were given (expected one gradient digest per client)",
      );
      expect(() => merge([first, { ...second, encodingHash: "0".repeat(64) }])).toThrow(
        `client "client-2" sent digests for encoding 000000000000…, not this analysis's ${encoding.hash.slice(0, 12)}… (expected digests computed with this analysis's encoding)`,
      );
      expect(() =>
        merge([first, { ...second, request: { ...second.request, encodingHash: "0".repeat(64) } }]),
      ).toThrow('client "client-2" sent digests for encoding');
      expect(() =>
        merge([first, { ...second, request: { ...request, reference: "given" } }]),
      ).toThrow(
        'client "client-2" measured at other points than client "client-1" (expected every client\'s digest made for the same reference and path)',
      );
      expect(() => merge([first, { ...second, client: "client-1" }])).toThrow(
        'client "client-1" sent two gradient digests (expected one gradient digest per client)',
      );
      const stolen = {
        ...second,
        shards: [{ ...second.shards[0], id: first.shards[0].id }, ...second.shards.slice(1)],
      };
      expect(() => merge([first, stolen])).toThrow(
        `shard "${first.shards[0].id}" was sent twice (by client "client-1" and by client "client-2") (expected every shard held by exactly one client)`,
      );
      const [head, next, ...others] = second.shards;
      const small = { ...second, shards: [{ ...head, rows: 9 }, next, ...others] };
      expect(() => merge([first, small])).toThrow(
        `client "client-2", shard "${head.id}" has 9 rows, under the minimum of 10 (expected at least 10 kept rows per shard)`,
      );
      // Exactly the minimum is enough (methods.md §9: fewer than 10 rows are refused).
      const atMinimum = {
        ...second,
        shards: [{ ...head, rows: 10 }, { ...next, rows: next.rows + head.rows - 10 }, ...others],
      };
      expect(merge([first, atMinimum]).shards.find((shard) => shard.id === head.id)?.rows).toBe(10);
      expect(() => merge([first])).toThrow(
        `the gradient digests cover ${first.shards.length} shards and ${first.shards.reduce((n, s) => n + s.rows, 0)} rows, round 1 had 6 shards and 344 rows (expected a gradient digest from every client of round 1)`,
      );
      // The rows of round 1 in 7 shards, then 6 shards with one row more.
      const rest = second.shards.slice(1);
      const split = {
        ...second,
        shards: [{ ...head, rows: 20 }, { ...head, id: "extra", rows: head.rows - 20 }, ...rest],
      };
      expect(() => merge([first, split])).toThrow(
        "cover 7 shards and 344 rows, round 1 had 6 shards",
      );
      const grown = { ...second, shards: [{ ...head, rows: head.rows + 1 }, ...rest] };
      expect(() => merge([first, grown])).toThrow("cover 6 shards and 345 rows");
      // Methods.md §9's shapes: 5 path points, C×(d+1) gradient sums and d feature sums.
      const d = encoding.featureNames.length;
      const shorter = {
        ...second,
        shards: [{ ...head, alongPath: head.alongPath.slice(1) }, ...rest],
      };
      expect(() => merge([first, shorter])).toThrow(
        `client "client-2", shard "${head.id}": the digest's sums have the wrong shape (expected 5 path points, gradients of ${3 * (d + 1)} numbers and ${d} feature sums)`,
      );
      const noNoise = {
        ...second,
        shards: [
          { ...head, atReference: { ...head.atReference, squaredGradientNormSum: null } },
          ...rest,
        ],
      };
      expect(() => merge([first, noNoise])).toThrow("the digest's sums have the wrong shape");
      const narrow = {
        ...second,
        shards: [{ ...head, featureSums: head.featureSums.slice(1) }, ...rest],
      };
      expect(() => merge([first, narrow])).toThrow("the digest's sums have the wrong shape");
      const shortGradient = {
        ...second,
        shards: [
          {
            ...head,
            alongPath: head.alongPath.map((sums, t) =>
              t === 4 ? { ...sums, gradientSum: sums.gradientSum.slice(1) } : sums,
            ),
          },
          ...rest,
        ],
      };
      expect(() => merge([first, shortGradient])).toThrow("the digest's sums have the wrong shape");
      expect(() => merge([first, second], 7)).toThrow(
        'column "participants": the plan has 7 participants per round (expected at most the number of shards (6))',
      );
      expect(merge([first, second], 6).advice).toBeDefined();
    });
  });
});
