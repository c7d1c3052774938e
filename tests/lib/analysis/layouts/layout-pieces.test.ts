import { describe, expect, it } from "vitest";
import { writeLayoutMap } from "@/lib/analysis/layouts/layout-map";
import { rankLayouts } from "@/lib/analysis/layouts/rank-layouts";
import { randomPermutation, shuffleInPlace } from "@/lib/analysis/layouts/shuffle";
import { apportionByLargestRemainder } from "@/lib/analysis/layouts/split-by-size";
import { SeededRandom } from "@/lib/math/random";
import { runPythonJson } from "../support/run-python";

describe("writeLayoutMap", () => {
  it("writes ids that Python's csv module reads back unchanged (RFC 4180 quoting)", () => {
    const ids = ["plain", "with,comma", 'say "hi"', "two\nlines", "carriage\rreturn", ""];
    const csv = writeLayoutMap(ids, Int32Array.of(0, 11, 3, 9, 0, 10), 12);
    // Outside reference: Python's csv.reader (RFC 4180 dialect "excel") parses the file.
    const parsed = runPythonJson<string[][]>(
      `import csv,io,json,sys
print(json.dumps(list(csv.reader(io.StringIO(json.load(sys.stdin), newline="")))))`,
      csv,
    );
    expect(parsed).toEqual([
      ["row_id", "shard"],
      ["plain", "s01"],
      ["with,comma", "s12"],
      ['say "hi"', "s04"],
      ["two\nlines", "s10"],
      ["carriage\rreturn", "s01"],
      ["", "s11"],
    ]);
    // Fields that need no quotes are written bare, and the file ends with one line break.
    expect(csv.startsWith("row_id,shard\nplain,s01\n")).toBe(true);
    expect(csv.endsWith("\n,s11\n")).toBe(true);
  });
});

describe("rankLayouts", () => {
  const layout = (name: string, ratio: number | null, js: number) => ({
    name,
    summary: { advice: { ratio }, labelSkew: { js } },
  });

  it("orders by ρ ascending, ties by weighted JS, no ρ last, without reordering its input", () => {
    // methods.md §8: "Rank by ρ (lower favours local updates), then by weighted JS".
    const input = [
      layout("no ratio", null, 0),
      layout("ρ 2", 2, 0.01),
      layout("ρ 1, JS 0.5", 1, 0.5),
      layout("ρ 0.5", 0.5, 0.9),
      layout("ρ 1, JS 0.2", 1, 0.2),
    ] as unknown as Parameters<typeof rankLayouts>[0];
    const ranked = rankLayouts(input).map((entry) => (entry as unknown as { name: string }).name);
    expect(ranked).toEqual(["ρ 0.5", "ρ 1, JS 0.2", "ρ 1, JS 0.5", "ρ 2", "no ratio"]);
    expect(input.map((entry) => (entry as unknown as { name: string }).name)[0]).toBe("no ratio");
  });
});

describe("apportionByLargestRemainder (Hamilton's method)", () => {
  it("gives the textbook allocation of 10 seats to 47000, 16000, 15800, 12000, 6100, 3100 votes", () => {
    // Worked example of the largest remainder method with the Hare quota (Wikipedia, "Largest
    // remainder method", from memory; checked by hand: quotas 4.7, 1.6, 1.58, 1.2, 0.61, 0.31,
    // floors 4, 1, 1, 1, 0, 0, the three seats left go to remainders 0.7, 0.61, 0.6).
    const votes = [47000, 16000, 15800, 12000, 6100, 3100];
    const total = votes.reduce((a, b) => a + b, 0);
    const shares = Float64Array.from(votes, (count) => count / total);
    expect(apportionByLargestRemainder(shares, 10)).toEqual([5, 2, 1, 1, 1, 0]);
  });

  it("gives equal remainders to the lower index first", () => {
    // Quotas 1.5 each: floors 1, 1, 1, 1 and the two rows left go to shards 0 and 1 (methods.md §8
    // "ties to the lower shard"; hand-computed).
    expect(apportionByLargestRemainder(Float64Array.of(0.25, 0.25, 0.25, 0.25), 6)).toEqual([
      2, 2, 1, 1,
    ]);
    // Quotas 0.5, 1.5, 2 (exact in binary): floors 0, 1, 2 and the one row left to the lower of
    // the two remainders 0.5.
    expect(apportionByLargestRemainder(Float64Array.of(0.125, 0.375, 0.5), 4)).toEqual([1, 1, 2]);
  });
});

describe("shuffleInPlace (Fisher–Yates)", () => {
  it("makes each of the 24 orders of four items about equally often (SciPy's χ² test)", () => {
    const random = new SeededRandom(5);
    const counts = new Map<string, number>();
    for (let draw = 0; draw < 24_000; draw++) {
      const key = shuffleInPlace([0, 1, 2, 3], random).join("");
      counts.set(key, (counts.get(key) ?? 0) + 1);
    }
    expect(counts.size).toBe(24);
    // Outside reference: scipy.stats.chisquare against the uniform distribution over the 4! orders
    // (Knuth, TAOCP vol. 2, Algorithm 3.4.2P makes them equally likely). Seeded, so the p-value is
    // fixed; a biased shuffle (e.g. j drawn from [0, n) at every step) gives p ≈ 0.
    const pValue = runPythonJson<number>(
      `import json,sys
from scipy import stats
print(json.dumps(stats.chisquare(json.load(sys.stdin)).pvalue))`,
      [...counts.values()],
    );
    expect(pValue).toBeGreaterThan(1e-3);
  });

  it("permutes 0 … n − 1 and returns the array it was given", () => {
    const values = [10, 11, 12, 13, 14, 15, 16];
    expect(shuffleInPlace(values, new SeededRandom(1))).toBe(values);
    expect([...values].sort()).toEqual([10, 11, 12, 13, 14, 15, 16]);
    const order = randomPermutation(9, new SeededRandom(2));
    expect(Array.from(order).sort()).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8]);
    expect(randomPermutation(0, new SeededRandom(2))).toHaveLength(0);
  });
});
