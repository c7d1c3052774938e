// How the simulation (methods.md §7) reads on the progress page and in the report. The thresholds
// of the verdicts are methods.md §5's (ρ ≤ ½ local updates, ρ ≥ 2 large minibatches); the rest
// are the product's own words, checked for the cases that change them.
import { describe, expect, it } from "vitest";
import { decideVerdict } from "@/lib/analysis/advise-plan";
import type { SimulationProgress } from "@/lib/analysis/simulation/simulate-plan";
import { overallProgress } from "@/lib/reports/analysis-status";
import {
  clampSuboptimality,
  describeComparison,
  describeSimulationProgress,
  describeStepSizeEdges,
  SUBOPTIMALITY_FLOOR,
  toCurvePoints,
} from "@/lib/reports/simulation-view";

const progress: SimulationProgress = {
  algorithm: "local",
  phase: "step-size",
  run: 14,
  runs: 33,
  round: 40,
  rounds: 100,
  fraction: (13 + 40 / 100) / 33,
};

describe("the simulation on the progress page", () => {
  it("names the algorithm, the run and the round", () => {
    expect(describeSimulationProgress(progress)).toBe(
      "Simulating: Local SGD, run 14 of 33, round 40 of 100",
    );
  });

  it("gives the simulation most of the bar after the engine's stages", () => {
    const running = { status: "running" as const, stage: "advising" as const, fraction: 1 };
    // Without a simulation the engine's five stages fill the bar.
    expect(overallProgress({ ...running, simulates: false, simulation: null })).toBeCloseTo(1, 12);
    // With one, the engine's stages are the first fifth, then the simulation's own fraction.
    expect(overallProgress({ ...running, simulates: true, simulation: null })).toBeCloseTo(0.2, 12);
    expect(
      overallProgress({ ...running, simulates: true, simulation: { ...progress, fraction: 0.5 } }),
    ).toBeCloseTo(0.6, 12);
    expect(
      overallProgress({ ...running, status: "succeeded", simulates: true, simulation: null }),
    ).toBe(1);
  });
});

describe("the simulation in the report", () => {
  it("draws values at or below zero at the floor of the log scale, and says so", () => {
    const { points, clamped } = toCurvePoints({
      curve: [
        [0, 0.7],
        [10, -1e-16],
      ],
      band: [
        [0, 0.6, 0.8],
        [10, -2e-16, 3e-9],
      ],
    });
    expect(points).toEqual([
      { round: 0, mean: 0.7, min: 0.6, max: 0.8 },
      { round: 10, mean: SUBOPTIMALITY_FLOOR, min: SUBOPTIMALITY_FLOOR, max: 3e-9 },
    ]);
    expect(clamped).toBe(true);
    expect(toCurvePoints({ curve: [[0, 0.7]], band: [[0, 0.6, 0.8]] }).clamped).toBe(false);
    expect(clampSuboptimality(0)).toBe(SUBOPTIMALITY_FLOOR);
  });

  it("says plainly whether the simulation agrees with the bounds", () => {
    const sentence = (ratio: number | null, bound: Parameters<typeof decideVerdict>[0]) =>
      describeComparison(decideVerdict(ratio), decideVerdict(bound), ratio);
    // ρ_sim = 0.2 → local updates; bounds ρ = 3 → large minibatches: opposite verdicts.
    expect(sentence(0.2, 3)).toBe(
      "The simulation on your shards points the other way from the bounds: they favour large minibatches, but local SGD ended at 0.2 times minibatch SGD's suboptimality, which favours local updates.",
    );
    expect(sentence(1.3, 2.575)).toBe(
      "The simulation on your shards does not back the bounds' verdict: the bounds favour large minibatches, but local SGD ended at 1.3 times minibatch SGD's suboptimality, within a factor of two, so no clear winner.",
    );
    // The ratio reads as the report prints ρ_sim beside it (three significant digits).
    expect(sentence(0.0195, 0.945)).toContain("local SGD ended at 0.0195 times");
    expect(sentence(0.4, 1)).toMatch(/^The simulation on your shards does not back .*no clear/);
    expect(sentence(4, 2)).toBe(
      "The simulation on your shards agrees with the bounds (large minibatches): local SGD ended at 4 times minibatch SGD's suboptimality.",
    );
    expect(sentence(null, 0.1)).toMatch(/gives no usable ratio .* \(local updates\)\.$/);
  });
});

describe("step sizes at the grid's edge in the report (methods.md §7)", () => {
  const grid = [8, 4, 2, 1].map((stepSize) => ({ stepSize, final: 1 / stepSize }));
  it("names each flagged algorithm, which end it is at, and what that means", () => {
    expect(
      describeStepSizeEdges([
        { name: "minibatch", stepSize: 8, stepSizeAtEdge: true, grid },
        { name: "local", stepSize: 1, stepSizeAtEdge: true, grid },
        { name: "scaffold", stepSize: 2, stepSizeAtEdge: false, grid },
      ]),
    ).toEqual([
      "Minibatch SGD's best step size, 8, is the largest tried: a larger one might do better, " +
        "so the comparison may be unfair to it.",
      "Local SGD's best step size, 1, is the smallest tried: a smaller one might do better, " +
        "so the comparison may be unfair to it.",
    ]);
  });

  it("says nothing for reports stored before the flag existed", () => {
    const stored = { name: "local" as const, stepSize: 8, grid };
    expect(describeStepSizeEdges([stored as never])).toEqual([]);
  });
});
