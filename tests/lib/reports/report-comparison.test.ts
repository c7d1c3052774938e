import { describe, expect, it } from "vitest";
import { advisePlan } from "@/lib/analysis/advise-plan";
import type { PartitionSummary } from "@/lib/analysis/summary";
import { compareReports, type ComparedReport } from "@/lib/reports/report-comparison";
import { PENGUIN_PLAN } from "./support/penguin-plan";

/** The fields of a summary that compareReports reads, with the engine's own advice for the plan. */
function report(overrides: Partial<PartitionSummary["advice"]> = {}, zeta2 = 0.01): ComparedReport {
  const advice = { ...advisePlan({ ...PENGUIN_PLAN, ...overrides }, 0.0014), ...overrides };
  const summary = {
    advice,
    heterogeneity: { zeta2, zeta2Max: 0.77, zeta2Star: 0.0014, sigma2: 0.009, smoothness: 1.9 },
    model: { distance: 5.7 },
    labelSkew: { tv: 0.4, js: 0.15, dirichletAlpha: 0.35, categories: ["a", "b", "c"] },
    quantitySkew: { gini: 0.22, cv: 0.42 },
    dataset: { rows: 344, features: 7, classes: 3 },
    shards: [{}, {}, {}],
  } as unknown as PartitionSummary; // only the fields compareReports reads
  return {
    summary,
    shardCount: 3,
    inputs: [
      {
        kind: "dataset",
        name: "penguins.csv",
        objectKey: "k",
        sizeBytes: 15000,
        sha256: "ab".repeat(32),
      },
    ],
  };
}

describe("compareReports", () => {
  it("marks nothing when two reports show the same figures", () => {
    expect(compareReports(report(), report()).filter((row) => row.differs)).toEqual([]);
  });

  it("marks the plan, the bounds and the verdict when only K changes", () => {
    const rows = compareReports(report(), report({ localSteps: 1024, rounds: 10 }));
    const differing = rows.filter((row) => row.differs).map((row) => row.label);
    expect(differing).toEqual(
      expect.arrayContaining(["Local steps K", "Rounds R", "ρ = local / minibatch", "Verdict"]),
    );
    expect(differing).not.toContain("ζ² at the reference");
    expect(rows.find((row) => row.label === "Verdict")).toMatchObject({
      a: "No clear winner",
      b: "Local updates",
    });
  });

  it("ignores differences below the three digits the page shows", () => {
    const rows = compareReports(report({}, 0.0123451), report({}, 0.0123449));
    expect(rows.find((row) => row.label === "ζ² at the reference")?.differs).toBe(false);
    // α̂ is the total concentration; per class it is α̂/C (methods.md §4): 0.35 / 3 classes.
    expect(rows.find((row) => row.label === "Dirichlet α̂ per class (α̂/C)")?.a).toBe("0.117");
  });
});
