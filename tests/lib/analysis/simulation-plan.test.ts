import { Readable } from "node:stream";
import { describe, expect, it } from "vitest";
import { AnalysisInputError, analyzePartition, type PartitionSummary } from "@/lib/analysis";
import {
  chooseCurveRounds,
  estimateSimulationCost,
  simulatePlan,
  type SimulationProgress,
} from "@/lib/analysis/simulation/simulate-plan";
import type { AnalysisOptionsInput } from "@/lib/validation/analysis-options";
import { analyzeText } from "./support/analyze-text";
import { designOf, loadDiabetesByTargetCsv, penguinsWithShards } from "./support/simulation-data";

type Simulation = NonNullable<PartitionSummary["simulation"]>;

function algorithmOf(simulation: Simulation, name: "minibatch" | "local" | "scaffold") {
  const found = simulation.algorithms.find((algorithm) => algorithm.name === name);
  if (!found) throw new Error(`no ${name} in the simulation`);
  return found;
}

async function simulate(csv: string, label: string, options: Partial<AnalysisOptionsInput>) {
  const summary = await analyzeText(csv, { labelColumn: label, shardColumn: "part", ...options });
  if (!summary.simulation) throw new Error("the summary has no simulation");
  return summary;
}

describe("the simulation of methods.md §7", () => {
  it("homogeneous split (every shard a copy), large K and b: local SGD ends clearly below minibatch SGD", async () => {
    // Open data: penguins (vega-datasets) copied into 4 shards. The fact is methods.md §5's: with
    // ζ = 0 and little noise, local SGD's K steps per round beat one large-batch step.
    const summary = await simulate(
      penguinsWithShards(() => "", 4),
      "Species",
      {
        localSteps: 16,
        batchSize: 64,
        rounds: 10,
        simulate: { seeds: 2 },
      },
    );
    const simulation = summary.simulation as Simulation;
    const local = algorithmOf(simulation, "local");
    const minibatch = algorithmOf(simulation, "minibatch");
    expect(local.finalMax as number).toBeLessThan(0.5 * (minibatch.finalMin as number));
    expect(simulation.ratio as number).toBeLessThanOrEqual(0.5);
    expect(simulation.verdict).toBe("local-updates");
    // The bounds say the same here (methods.md §5: ζ = 0 and large K favour local updates), so the
    // simulation agrees with them.
    expect(summary.advice.verdict).toBe("local-updates");
    expect(simulation.agreesWithBounds).toBe(true);
  });

  it("one class per shard and K = 32: minibatch SGD ends clearly below local SGD (client drift)", async () => {
    // Open data: penguins split by species, so every shard holds one class. With λ = 0.1 the
    // optimum is near enough for R = 100 minibatch steps, and local SGD's drift shows.
    const summary = await simulate(
      penguinsWithShards((_, record) => record.Species),
      "Species",
      {
        localSteps: 32,
        batchSize: 16,
        rounds: 100,
        lambda: 0.1,
        simulate: { seeds: 2 },
      },
    );
    const simulation = summary.simulation as Simulation;
    const local = algorithmOf(simulation, "local");
    const minibatch = algorithmOf(simulation, "minibatch");
    expect(minibatch.finalMax as number).toBeLessThan(0.5 * (local.finalMin as number));
    expect(simulation.verdict).toBe("large-minibatch");
    // The heterogeneity barrier of methods.md §5: the bounds favour minibatches too.
    expect(summary.advice.verdict).toBe("large-minibatch");
    expect(simulation.agreesWithBounds).toBe(true);
    // SCAFFOLD corrects the drift (methods.md §7): far below local SGD.
    expect(algorithmOf(simulation, "scaffold").final as number).toBeLessThan(
      0.5 * (local.final as number),
    );
  });

  it("is deterministic: the same seed gives the same JSON, another seed other curves", async () => {
    const csv = penguinsWithShards((_, record) => record.Island);
    const options = { localSteps: 4, batchSize: 8, rounds: 12, participants: 2 };
    const first = await simulate(csv, "Species", { ...options, simulate: { seed: 5 } });
    const again = await simulate(csv, "Species", { ...options, simulate: { seed: 5 } });
    const other = await simulate(csv, "Species", { ...options, simulate: { seed: 6 } });
    expect(JSON.stringify(again.simulation)).toBe(JSON.stringify(first.simulation));
    const simulation = first.simulation as Simulation;
    expect(simulation.generator).toBe("xoshiro128**");
    expect(simulation.seeds).toBe(3);
    for (const name of ["minibatch", "local", "scaffold"] as const) {
      const curve = algorithmOf(simulation, name).curve;
      const otherCurve = algorithmOf(other.simulation as Simulation, name).curve;
      expect(curve).toHaveLength(13);
      expect(curve[0]).toEqual(otherCurve[0]); // both start at W₀ = 0
      expect(curve.slice(1)).not.toEqual(otherCurve.slice(1));
    }
  });

  it("discards step sizes whose runs diverge and picks the lowest final loss among the rest", async () => {
    // Open data: scikit-learn's diabetes. Single-row batches (b = 1) and many local steps make the
    // grid's largest steps unstable for plain local SGD (η‖x̃ᵢ‖² > 2 on single rows; common practice).
    const summary = await simulate(loadDiabetesByTargetCsv(), "target", {
      task: "regression",
      localSteps: 32,
      batchSize: 1,
      rounds: 20,
      simulate: { seeds: 1 },
    });
    const simulation = summary.simulation as Simulation;
    for (const algorithm of simulation.algorithms) {
      // The 8 of the grid and up to 3 beyond one of its ends, each half the one before.
      expect(algorithm.grid.length).toBeGreaterThanOrEqual(8);
      expect(algorithm.grid.length).toBeLessThanOrEqual(11);
      algorithm.grid.slice(1).forEach((entry, k) => {
        expect(entry.stepSize).toBe(algorithm.grid[k].stepSize / 2);
      });
      const kept = algorithm.grid.filter((entry) => entry.final !== null);
      const best = kept.reduce((a, b) => ((b.final as number) < (a.final as number) ? b : a));
      expect(algorithm.stepSize).toBe(best.stepSize);
      expect(Number.isFinite(algorithm.final)).toBe(true);
    }
    const local = algorithmOf(simulation, "local");
    expect(local.grid[0].final).toBeNull();
    expect(local.stepSize).toBeLessThan(local.grid[0].stepSize);
    // Step sizes are 2⁻ᵏ/H; local SGD's largest diverged, so its grid was not extended upwards.
    const smoothness = summary.heterogeneity.smoothness;
    local.grid.forEach((entry, k) => expect(entry.stepSize).toBe(2 ** -k / smoothness));
  });

  it("estimates its cost as 3 × (8 + S) × R·M·K·b·(d+1)·C and refuses above the budget", async () => {
    // methods.md §7: 100 shards, K = 10, R = 100, b = 32, d + 1 = 33, C = 10, S = 3, by hand:
    // 3 × 11 × 100·100·10·32·33·10 = 3.4848e10.
    expect(
      estimateSimulationCost(
        { participants: 100, localSteps: 10, rounds: 100, batchSize: 32 },
        33,
        10,
        3,
      ),
    ).toBe(3.4848e10);
    const csv = penguinsWithShards((_, record) => record.Island);
    const refusal = simulate(csv, "Species", { rounds: 1000, simulate: { budget: 1e8 } });
    await expect(refusal).rejects.toBeInstanceOf(AnalysisInputError);
    // Penguins encode to d = 10 features (4 numeric; island and sex one-hot, 3 levels each), C = 3,
    // M = 3 islands: 3 × 11 × 1000·3·10·32·11·3 = 1.04544e9; 1000 × 1e8 / 1.04544e9 → 95 rounds.
    await expect(refusal).rejects.toThrow(
      "the simulation would take about 1.05e9 multiply-adds, above the budget of 1.00e8 " +
        "(expected at most 95 rounds, or a larger budget)",
    );
  });

  it("reports progress by run and round and stops when cancelled", async () => {
    const csv = penguinsWithShards((_, record) => record.Island);
    const seen: SimulationProgress[] = [];
    const controller = new AbortController();
    const cancelled = analyzePartition({
      data: Readable.from([csv]),
      options: {
        labelColumn: "Species",
        shardColumn: "part",
        rounds: 5,
        localSteps: 2,
        simulate: { seeds: 1 },
      },
      signal: controller.signal,
      onSimulationProgress: (progress) => {
        seen.push(progress);
        if (progress.run === 14 && progress.round === 3) controller.abort(new Error("stopped"));
      },
    });
    await expect(cancelled).rejects.toThrow("stopped");
    // Per algorithm 8 grid runs, 3 places to extend the grid (runs 9–11 for minibatch SGD), 1 seed.
    expect(seen[0]).toMatchObject({ algorithm: "minibatch", phase: "step-size", run: 1, runs: 36 });
    expect(seen[seen.length - 1]).toMatchObject({ run: 14, round: 3, algorithm: "local" });
    const fractions = seen.map((progress) => progress.fraction);
    expect(fractions).toEqual([...fractions].sort((a, b) => a - b));
    expect(seen.find((progress) => progress.run === 12)?.phase).toBe("seeds");
  });

  describe("extends the step-size grid while its best step size is at an end (methods.md §7)", () => {
    // Open data: penguins, one shard per island. H is the simulation's input here, set wrong on
    // purpose so the best step size lies outside the grid 2⁻ᵏ/H, k = 0…7. Expected step sizes
    // follow from methods.md §7's rule; the finals they compare come from the runs themselves.
    const plan = { participants: 2, localSteps: 4, rounds: 40, batchSize: 8 };
    async function simulateWith(smoothness: number) {
      const design = await designOf(
        penguinsWithShards((_, record) => record.Island),
        "Species",
      );
      // F(W₀) = log C for softmax at W = 0; the optimum's value only shifts every final equally.
      const problem = { design, lambda: 1e-3, optimumValue: 0, startValue: Math.log(3) };
      return simulatePlan({ ...problem, smoothness, boundVerdict: "no-clear-winner" }, plan, {
        seeds: 1,
        seed: 9,
        budget: 1e12,
        threads: 1,
      });
    }

    it("H ten thousand times too large: every step is too small, the grid grows to 2³/H and says so", async () => {
      const smoothness = 1e4;
      const simulation = await simulateWith(smoothness);
      for (const algorithm of simulation.algorithms) {
        // Far below the stable step, a larger step makes more progress (common practice).
        expect(algorithm.stepSize).toBe(8 / smoothness);
        expect(algorithm.stepSizeAtEdge).toBe(true);
        expect(algorithm.grid.map((entry) => entry.stepSize * smoothness)).toEqual(
          Array.from({ length: 11 }, (_, i) => 2 ** (3 - i)),
        );
      }
    });

    it("H far too small: the large steps diverge and the grid grows downwards until one wins inside", async () => {
      const smoothness = 1 / 512;
      const simulation = await simulateWith(smoothness);
      for (const algorithm of simulation.algorithms) {
        const steps = algorithm.grid.map((entry) => entry.stepSize * smoothness);
        expect(steps[0]).toBe(1); // never extended upwards: 1/H diverged
        expect(algorithm.grid[0].final).toBeNull();
        const chosen = steps.indexOf((algorithm.stepSize as number) * smoothness);
        // The winner has a tried neighbour on each side, so it is not at the edge.
        expect(chosen).toBeGreaterThan(0);
        expect(chosen).toBeLessThan(steps.length - 1);
        expect(algorithm.stepSizeAtEdge).toBe(false);
        const finals = algorithm.grid.map((entry) => entry.final ?? Infinity);
        expect(finals[chosen]).toBe(Math.min(...finals));
      }
      // Local SGD's best lies below the grid's smallest step 2⁻⁷/H, so the grid grew past it.
      const local = simulation.algorithms[1];
      expect((local.stepSize as number) * smoothness).toBeLessThan(2 ** -7);
    });
  });

  it("keeps at most 100 curve points, from round 0 to round R", () => {
    expect(Array.from(chooseCurveRounds(3))).toEqual([0, 1, 2, 3]);
    expect(chooseCurveRounds(99)).toHaveLength(100);
    const long = chooseCurveRounds(1000);
    expect(long).toHaveLength(100);
    expect([long[0], long[99]]).toEqual([0, 1000]);
    expect(new Set(long).size).toBe(100);
  });
});
