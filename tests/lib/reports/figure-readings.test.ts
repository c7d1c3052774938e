import { beforeAll, describe, expect, it } from "vitest";
import type { PartitionSummary } from "@/lib/analysis/summary";
import {
  barrierFraction,
  describeConcentration,
  readKeyFigures,
  shareBetweenShards,
} from "@/lib/reports/figure-readings";
import { analyzePenguinsWithCli } from "@/tests/support/report-fixtures";

/**
 * The key figures' readings on real CLI output (penguins from vega-datasets, BSD-3, shards =
 * island), checked against what the engine computed independently: its barrier flag, the law of
 * total variance and the eigenvalue range of a correlation matrix.
 */
describe.each([
  ["the default plan", [] as string[]],
  ["R = 10000", ["--rounds", "10000"]],
])("key figure readings (%s)", (_, flags) => {
  let summary: PartitionSummary;
  beforeAll(async () => {
    summary = await analyzePenguinsWithCli(flags);
  });

  it("puts ζ*² at or above 1× the barrier exactly when the engine flags the barrier", () => {
    const fraction = barrierFraction(summary);
    expect(fraction).not.toBeNull();
    expect((fraction as number) >= 1).toBe(summary.advice.heterogeneityBarrier);
  });

  it("reads ζ² as a share of σ²_pooled, which the law of total variance splits as σ² + ζ²", () => {
    const { zeta2, sigma2 } = summary.heterogeneity;
    // Identity (methods.md §3): σ²_pooled = σ² + ζ², so the share is ζ²/(σ² + ζ²).
    expect(shareBetweenShards(summary)).toBeCloseTo(zeta2 / (sigma2 + zeta2), 9);
  });

  it("gives H a range that contains it: ½·λmax of a correlation matrix lies in [½, ½·d], plus λ", () => {
    const h = readKeyFigures(summary, summary.shards.length).find((figure) =>
      figure.name.startsWith("H"),
    );
    const [low, high] = (h?.scale.match(/[\d.]+/g) ?? []).map(Number);
    // Linear algebra (common practice): a d×d correlation matrix has trace d and its largest
    // eigenvalue between 1 and d.
    expect(summary.heterogeneity.smoothness).toBeGreaterThanOrEqual(low * (1 - 1e-9));
    expect(summary.heterogeneity.smoothness).toBeLessThanOrEqual(high * (1 + 1e-9));
  });

  it("shows α̂ in total and per class side by side", () => {
    const alpha = readKeyFigures(summary, summary.shards.length).find((figure) =>
      figure.name.startsWith("Dirichlet"),
    );
    expect(alpha?.name).toContain("total · per class");
    expect(alpha?.what).toContain("α̂/C = α̂/3");
  });
});

describe("describeConcentration", () => {
  // A split made as Dirichlet(0.1) per class over 10 classes has total α = 1 (methods.md §4:
  // α = β·C); read per class it is strong skew, not the mild skew "α̂ = 1" suggests.
  it("reads total α = 1 over 10 classes as strong skew, and the search ceiling as IID", () => {
    expect(describeConcentration(1, 10)).toMatch(/^Strong label skew/);
    expect(describeConcentration(1e6, 10)).toBe("Indistinguishable from an IID split");
    expect(describeConcentration(500, 3)).toBe("Close to an IID split");
  });
});
