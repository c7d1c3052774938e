import { describe, expect, it } from "vitest";
import { AnalysisInputError } from "@/lib/analysis";
import {
  generateLayout,
  parseLayoutSpec,
  type LayoutSpec,
} from "@/lib/analysis/layouts/generators";
import { formatShardId } from "@/lib/analysis/layouts/layout-rows";
import { fnv1a32 } from "@/lib/analysis/layouts/split-by-group";
import { onThisThread, type ShareKMeansRows } from "@/lib/analysis/layouts/kmeans-steps";
import {
  CLUSTER_SAMPLE_ROWS,
  seedCentres,
  splitClusters,
} from "@/lib/analysis/layouts/split-clusters";
import { SeededRandom } from "@/lib/math/random";
import { measureLabelSkew } from "@/lib/analysis/measure-label-skew";
import { measureQuantitySkew } from "@/lib/analysis/measure-quantity-skew";
import { runPythonJson } from "../support/run-python";
import { countByShard, makeRows, shardsPerGroup } from "./support";

const sizesOf = (assignment: Int32Array, shardCount: number) => {
  const sizes = new Array<number>(shardCount).fill(0);
  for (const shard of assignment) sizes[shard]++;
  return sizes;
};

describe("shard ids", () => {
  it("are s001 … zero-padded to the width of M (methods.md §8)", () => {
    expect(formatShardId(0, 7)).toBe("s1");
    expect(formatShardId(0, 12)).toBe("s01");
    expect(formatShardId(99, 100)).toBe("s100");
    expect(formatShardId(4, 100)).toBe("s005");
  });
});

describe("iid and stratified (exact checks of methods.md §8)", () => {
  const rows = makeRows({ rows: 1003, classCount: 4 });
  const M = 7;

  it("iid: sizes are ⌊N/M⌋ or ⌈N/M⌉", () => {
    const sizes = sizesOf(generateLayout({ generator: "iid" }, rows, M, 3), M);
    for (const size of sizes) expect([143, 144]).toContain(size); // 1003 / 7 = 143.3
    expect(sizes.reduce((a, b) => a + b, 0)).toBe(1003);
  });

  it("stratified: every shard holds ⌊n_c/M⌋ or ⌈n_c/M⌉ rows of class c; sizes differ by ≤ 1", () => {
    const assignment = generateLayout({ generator: "stratified" }, rows, M, 3);
    const counts = countByShard(rows, assignment, M);
    for (let c = 0; c < 4; c++) {
      const total = counts.reduce((sum, row) => sum + row[c], 0);
      for (const row of counts) {
        expect([Math.floor(total / M), Math.ceil(total / M)]).toContain(row[c]);
      }
    }
    const sizes = sizesOf(assignment, M);
    expect(Math.max(...sizes) - Math.min(...sizes)).toBeLessThanOrEqual(1);
  });
});

describe("dirichlet(α)", () => {
  it("makes equal sizes (±1)", () => {
    // 1003 = 10 · 100 + 3: three shards take one row more, and no row is left unplaced.
    const rows = makeRows({ rows: 1003, classCount: 3 });
    const sizes = sizesOf(generateLayout({ generator: "dirichlet", alpha: 0.5 }, rows, 10, 2), 10);
    for (const size of sizes) expect([100, 101]).toContain(size);
  });

  // Statistical check of methods.md §8: 20 shards of 250 rows, five classes with pooled shares
  // 1:2:3:4:5; the §4 fit (measureLabelSkew, itself checked against SciPy in reference-model tests)
  // must recover α within a factor of two. Seeded, so the outcome is fixed; the factor is the contract's.
  it.each([0.5, 5, 50])("the fitted α̂ is within a factor 2 of α = %s", (alpha) => {
    const rows = makeRows({ rows: 5000, classCount: 5, seed: 5 });
    const assignment = generateLayout({ generator: "dirichlet", alpha }, rows, 20, 17);
    const fitted = measureLabelSkew(countByShard(rows, assignment, 20)).dirichletAlpha;
    expect(fitted).toBeGreaterThan(alpha / 2);
    expect(fitted).toBeLessThan(alpha * 2);
  });

  // When α is so small that every Dir(α·p) draw underflows (0/0), the class of each next row is
  // drawn in proportion to the rows left (splitDirichlet's doc): a uniformly random row, so the
  // shards are a random equal-sized split whose label counts SciPy's χ² test of independence
  // (scipy.stats.chi2_contingency) accepts. Drawing from the underflowed mix instead would fill
  // the shards class by class (p ≈ 0). Seeded, so the p-value is fixed.
  it("falls back to the rows left when α underflows: label counts independent of the shard", () => {
    const rows = makeRows({ rows: 1200, classCount: 4, seed: 3 });
    const assignment = generateLayout({ generator: "dirichlet", alpha: 1e-300 }, rows, 6, 5);
    const counts = countByShard(rows, assignment, 6);
    for (const row of counts) expect(row.reduce((a, b) => a + b, 0)).toBe(200);
    const pValue = runPythonJson<number>(
      `import json,sys
from scipy import stats
print(json.dumps(stats.chi2_contingency(json.load(sys.stdin)).pvalue))`,
      counts,
    );
    expect(pValue).toBeGreaterThan(1e-3);
  });

  it("β per class is α = β·C: the same layout for the same seed", () => {
    const rows = makeRows({ rows: 600, classCount: 4 });
    const byBeta = generateLayout({ generator: "dirichlet", betaPerClass: 0.25 }, rows, 6, 9);
    const byAlpha = generateLayout({ generator: "dirichlet", alpha: 1 }, rows, 6, 9);
    expect(Array.from(byBeta)).toEqual(Array.from(byAlpha));
  });
});

describe("classes(k)", () => {
  const rows = makeRows({ rows: 2000, classCount: 5 });

  it.each([1, 2, 3, 5, 7])("every shard holds exactly min(k, C) classes (k = %s, C = 5)", (k) => {
    const M = 10;
    const counts = countByShard(rows, generateLayout({ generator: "classes", k }, rows, M, 4), M);
    for (const row of counts) expect(row.filter((count) => count > 0)).toHaveLength(Math.min(k, 5));
  });

  it("splits each class evenly (±1) over its holders", () => {
    const counts = countByShard(
      rows,
      generateLayout({ generator: "classes", k: 2 }, rows, 10, 4),
      10,
    );
    for (let c = 0; c < 5; c++) {
      const held = counts.map((row) => row[c]).filter((count) => count > 0);
      expect(Math.max(...held) - Math.min(...held)).toBeLessThanOrEqual(1);
    }
  });

  it("refuses a k that leaves classes without a shard (M·k < C)", () => {
    expect(() => generateLayout({ generator: "classes", k: 1 }, rows, 3, 4)).toThrow(
      AnalysisInputError,
    );
  });
});

describe("quantity(β)", () => {
  const rows = makeRows({ rows: 3000, classCount: 3 });

  it("sizes sum to N and every shard has a row", () => {
    const sizes = sizesOf(generateLayout({ generator: "quantity", beta: 0.5 }, rows, 12, 8), 12);
    expect(sizes.reduce((a, b) => a + b, 0)).toBe(3000);
    expect(Math.min(...sizes)).toBeGreaterThan(0);
  });

  // Statistical check: the Gini of Dir(β·1) shares grows as β falls. Means over ten seeds each; the
  // gaps between β = 0.3, 1 and 10 are several times the seed-to-seed spread (seeded, so fixed).
  it("Gini grows as β falls", () => {
    const meanGini = (beta: number) => {
      let total = 0;
      for (let seed = 1; seed <= 10; seed++) {
        const sizes = sizesOf(generateLayout({ generator: "quantity", beta }, rows, 10, seed), 10);
        total += measureQuantitySkew(sizes).gini;
      }
      return total / 10;
    };
    const [low, middle, high] = [meanGini(0.3), meanGini(1), meanGini(10)];
    expect(low).toBeGreaterThan(middle);
    expect(middle).toBeGreaterThan(high);
  });

  it("gives a clear error when a shard stays empty in 100 draws", () => {
    const few = makeRows({ rows: 12, classCount: 2 });
    expect(() => generateLayout({ generator: "quantity", beta: 0.01 }, few, 12, 1)).toThrow(
      /left a shard empty in 100 draws/,
    );
  });
});

describe("clusters", () => {
  // Identity: k-means fitted on all rows (N ≤ 50,000) converges to a Lloyd fixed point, where every
  // row's nearest cluster mean is its own cluster's (ties aside; the blobs are well apart).
  it("puts every row in its nearest centre's shard", () => {
    const rows = makeRows({ rows: 1500, classCount: 4, width: 2 });
    const M = 4;
    const assignment = generateLayout({ generator: "clusters" }, rows, M, 6);
    const { cols, data } = rows.features;
    const means = Array.from({ length: M }, () => [0, 0, 0]);
    assignment.forEach((m, row) => {
      means[m][0] += data[row * cols];
      means[m][1] += data[row * cols + 1];
      means[m][2]++;
    });
    const centres = means.map(([x, y, n]) => [x / n, y / n]);
    let misplaced = 0;
    assignment.forEach((m, row) => {
      const distances = centres.map(
        ([x, y]) => (data[row * cols] - x) ** 2 + (data[row * cols + 1] - y) ** 2,
      );
      if (distances.indexOf(Math.min(...distances)) !== m) misplaced++;
    });
    expect(misplaced).toBe(0);
  });

  // k-means++ (Arthur & Vassilvitskii 2007, from memory) draws each next centre with weight d²: on
  // four blobs 100 apart with unit spread, a second centre in an already chosen blob has weight
  // about 1/10⁴ of the others, so every blob gets one of the four starting centres.
  it("starts k-means from one centre per well-separated blob, the same for the same seed", () => {
    const random = new SeededRandom(11);
    const corners = [
      [0, 0],
      [100, 0],
      [0, 100],
      [100, 100],
    ];
    const values = new Float64Array(4 * 250 * 2);
    for (let point = 0; point < 1000; point++) {
      const [x, y] = corners[point % 4];
      values[2 * point] = x + random.normal();
      values[2 * point + 1] = y + random.normal();
    }
    const centres = seedCentres(values, 2, 4, new SeededRandom(3));
    const blobs = [0, 1, 2, 3].map(
      (m) => 2 * Math.round(centres[2 * m + 1] / 100) + Math.round(centres[2 * m] / 100),
    );
    expect([...blobs].sort()).toEqual([0, 1, 2, 3]);
    expect(seedCentres(values, 2, 4, new SeededRandom(3))).toEqual(centres);
  });

  // methods.md §8: k-means is fitted on a sample of at most 50,000 rows, then every row is placed.
  // The steps are handed the rows they run on, so their counts show which rows each step saw.
  it("fits k-means on 50,000 of 50,001 rows and places all of them", () => {
    const rows = makeRows({ rows: CLUSTER_SAMPLE_ROWS + 1, classCount: 2, width: 1 });
    const counted: number[] = [];
    const share: ShareKMeansRows = (matrix) => {
      counted.push(matrix.rows);
      return onThisThread(matrix);
    };
    const assignment = splitClusters(rows, 2, new SeededRandom(4), share);
    expect(CLUSTER_SAMPLE_ROWS).toBe(50_000);
    expect(counted).toEqual([50_000, 50_000, 50_001]); // the start, Lloyd's steps, the placement
    expect(assignment.length).toBe(50_001);
  });

  // methods.md §8: an empty cluster is an error that suggests a smaller M. Rows that are all alike
  // give k-means++ two equal starting centres, and every row goes to the lower one.
  it("refuses a layout with an empty cluster, suggesting a smaller M", () => {
    const rows = makeRows({ rows: 30, classCount: 2, width: 2 });
    for (let row = 0; row < 30; row++) rows.features.data.fill(0.5, row * 3, row * 3 + 2);
    const refusal = (() => {
      try {
        generateLayout({ generator: "clusters" }, rows, 2, 1);
      } catch (error) {
        return error;
      }
    })();
    expect(refusal).toBeInstanceOf(AnalysisInputError);
    expect((refusal as AnalysisInputError).problem).toBe(
      "clusters: k-means left cluster 2 of 2 empty",
    );
    expect((refusal as AnalysisInputError).expected).toMatch(/a smaller M$/);
  });

  it("refuses features that are only the bias", () => {
    const rows = makeRows({ rows: 50, classCount: 2, width: 0 });
    expect(() => generateLayout({ generator: "clusters" }, rows, 2, 1)).toThrow(/usable feature/);
  });
});

describe("group-hash", () => {
  // FNV-1a 32-bit test vectors (Fowler/Noll/Vo reference suite, from memory); the same values come
  // out of Python's int arithmetic in the group-balanced test file's reference program.
  it("hashes with FNV-1a 32", () => {
    expect(fnv1a32("")).toBe(0x811c9dc5);
    expect(fnv1a32("a")).toBe(0xe40c292c);
    expect(fnv1a32("foobar")).toBe(0xbf9cf968);
  });

  it("keeps every group whole, in shard hash mod M", () => {
    const rows = makeRows({ rows: 800, classCount: 3, groupCount: 40 });
    const assignment = generateLayout({ generator: "group-hash" }, rows, 5, 1);
    shardsPerGroup(rows, assignment).forEach((shards, g) => {
      expect([...shards]).toEqual([fnv1a32(`group-${g}`) % 5]);
    });
  });
});

describe("determinism per seed", () => {
  const rows = makeRows({ rows: 700, classCount: 3, groupCount: 30 });
  const specs: LayoutSpec[] = [
    { generator: "iid" },
    { generator: "stratified" },
    { generator: "dirichlet", alpha: 1 },
    { generator: "classes", k: 2 },
    { generator: "quantity", beta: 1 },
    { generator: "clusters" },
    { generator: "group-hash" },
    { generator: "group-balanced" },
  ];
  it.each(specs)("$generator: the same seed gives the same layout", (spec) => {
    const first = Array.from(generateLayout(spec, rows, 4, 21));
    expect(Array.from(generateLayout(spec, rows, 4, 21))).toEqual(first);
  });
  it.each(specs.slice(0, 6))("$generator: another seed gives another layout", (spec) => {
    const first = Array.from(generateLayout(spec, rows, 4, 21));
    expect(Array.from(generateLayout(spec, rows, 4, 22))).not.toEqual(first);
  });
});

describe("generator lists", () => {
  it("parses names with parameters", () => {
    expect(parseLayoutSpec("dirichlet:0.5")).toEqual({ generator: "dirichlet", alpha: 0.5 });
    expect(parseLayoutSpec("dirichlet:beta=0.1")).toEqual({
      generator: "dirichlet",
      betaPerClass: 0.1,
    });
    expect(parseLayoutSpec(" classes:2")).toEqual({ generator: "classes", k: 2 });
    expect(parseLayoutSpec("group-hash")).toEqual({ generator: "group-hash" });
  });
  it.each([
    "shuffle",
    "dirichlet",
    "dirichlet:-1",
    "classes:1.5",
    "quantity:abc",
    "iid:3",
    "a:b:c",
  ])("refuses %s with an input error", (text) =>
    expect(() => parseLayoutSpec(text)).toThrow(AnalysisInputError),
  );
  it("refuses a group generator without groups", () => {
    const rows = makeRows({ rows: 20, classCount: 2 });
    expect(() => generateLayout({ generator: "group-balanced" }, rows, 2, 1)).toThrow(
      /needs a group column/,
    );
  });
});
