import { describe, expect, it } from "vitest";
import {
  ALGORITHMS,
  checkSimulationBudget,
  countOf,
  estimateEvaluationCost,
  estimateSimulationCost,
  fitWithinBudget,
} from "@/lib/analysis/simulation/simulation-cost";

// The simulation's cost as methods.md §7 states it — about 3 algorithms × (8 + S) runs ×
// R·M·K·b·(d+1)·C multiply-adds — and the full-data loss passes on top, every figure worked out by
// hand beside its check.

describe("the simulation's cost (methods.md §7)", () => {
  it("counts 3 × (8 + S) × R·M·K·b·(d+1)·C multiply-adds", () => {
    expect(ALGORITHMS).toEqual(["minibatch", "local", "scaffold"]);
    // 3 × 11 × 100·100·10·32·33·10 = 3.4848e10.
    const plan = { participants: 100, localSteps: 10, rounds: 100, batchSize: 32 };
    expect(estimateSimulationCost(plan, 33, 10, 3)).toBe(3.4848e10);
    // Every factor counts once: 3 × (8 + 1) × 2·3·5·7·11·13 = 27 × 30030 = 810810.
    expect(
      estimateSimulationCost(
        { rounds: 2, participants: 3, localSteps: 5, batchSize: 7 },
        11,
        13,
        1,
      ),
    ).toBe(810810);
  });

  it("counts the loss passes: N·(d+1)·C at min(R + 1, 11) points of 8 grid runs and min(R + 1, 100) of S seed runs", () => {
    // 3 × (8·11 + 3·100) × 100 000·33·10 = 3 × 388 × 3.3e7 = 3.8412e10.
    expect(estimateEvaluationCost(100, 100_000, 33, 10, 3)).toBe(3.8412e10);
    // R = 4: 3 × (8·5 + 2·5) × 10·3·2 = 3 × 50 × 60 = 9000.
    expect(estimateEvaluationCost(4, 10, 3, 2, 2)).toBe(9000);
    // R = 10 is 11 points, R = 99 is 100: 3 × (8·11 + 1·11) × 1 = 297; 3 × (88 + 100) = 564.
    expect(estimateEvaluationCost(10, 1, 1, 1, 1)).toBe(297);
    expect(estimateEvaluationCost(99, 1, 1, 1, 1)).toBe(564);
    expect(estimateEvaluationCost(500, 1, 1, 1, 1)).toBe(564);
  });

  it("finds the largest R, M and S that alone fit, null where even 1 does not", () => {
    const plan = { participants: 3, localSteps: 1, rounds: 1000, batchSize: 32 };
    // budget / cost = 0.0957 (penguins by island, R = 1000, M = 3, S = 3): R ≤ ⌊95.7⌋ = 95,
    // M: ⌊0.287⌋ = 0, S: ⌊11 × 0.0957 − 8⌋ < 1.
    expect(fitWithinBudget(1.04544e9, 1e8, plan, 3)).toEqual({
      rounds: 95,
      participants: null,
      seeds: null,
    });
    // Share 0.5: R ⌊500⌋, M ⌊1.5⌋ = 1 (exactly one still fits), S ⌊11 × 0.5 − 8⌋ < 1.
    expect(fitWithinBudget(2, 1, plan, 3)).toEqual({ rounds: 500, participants: 1, seeds: null });
    // Share 0.9 with S = 12: ⌊20 × 0.9 − 8⌋ = 10 seeds.
    expect(fitWithinBudget(10, 9, plan, 12).seeds).toBe(10);
  });

  it("refuses above the budget only, naming what alone would fit", () => {
    const plan = { participants: 10, localSteps: 1, rounds: 10, batchSize: 1 };
    expect(() => checkSimulationBudget(1e6, 1e6, plan, 3)).not.toThrow();
    expect(() => checkSimulationBudget(1e6 + 1, 1e6, plan, 3)).toThrow(
      "the simulation would take about 1.00e6 multiply-adds, above the budget of 1.00e6 " +
        "(expected at most 9 rounds, or at most 9 participants per round, or at most 2 seeds, or a larger budget)",
    );
  });

  it("says in the singular what fits at one, and asks for less of everything when nothing alone fits", () => {
    const plan = { participants: 10, localSteps: 1, rounds: 10, batchSize: 1 };
    // Share 0.15: ⌊1.5⌋ = 1 round and 1 participant; 11 × 0.15 − 8 < 1 seed.
    expect(() => checkSimulationBudget(1e6, 1.5e5, plan, 3)).toThrow(
      "the simulation would take about 1.00e6 multiply-adds, above the budget of 1.50e5 " +
        "(expected at most 1 round, or at most 1 participant per round, or a larger budget)",
    );
    // Share 0.86: ⌊8.6⌋ = 8 rounds, 8 participants; ⌊11 × 0.86 − 8⌋ = ⌊1.46⌋ = 1 seed.
    expect(() => checkSimulationBudget(1e6, 8.6e5, plan, 3)).toThrow(
      "(expected at most 8 rounds, or at most 8 participants per round, or at most 1 seed, or a larger budget)",
    );
    // Share 0.05: ⌊0.5⌋ = 0 rounds and participants, no seeds.
    expect(() => checkSimulationBudget(1e6, 5e4, plan, 3)).toThrow(
      "(expected fewer rounds, participants, local steps or a smaller batch together, or a larger budget)",
    );
  });

  it("says 1 round, 2 rounds", () => {
    expect(countOf(1, "round")).toBe("1 round");
    expect(countOf(2, "round")).toBe("2 rounds");
    expect(countOf(0, "seed")).toBe("0 seeds");
  });
});
