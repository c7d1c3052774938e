// The clusters generator's k-means++ start against scikit-learn's `kmeans_plusplus` (Debian's
// python3-sklearn), its greedy form with 2 + ⌊ln k⌋ trials a round. scikit-learn is handed the
// same random numbers (a RandomState whose `randint` and `uniform` replay the draws seedCentres
// made), so both must choose the same points in the same order.
import { describe, expect, it } from "vitest";
import { seedCentres } from "@/lib/analysis/layouts/split-clusters";
import { SeededRandom } from "@/lib/math/random";
import { runPythonJson } from "../support/run-python";
import { standardizedPenguinMeasurements } from "./support";

/** A SeededRandom that keeps the draws it hands out, to be replayed to scikit-learn. */
class RecordedRandom extends SeededRandom {
  readonly integers: number[] = [];
  readonly uniforms: number[] = [];

  override integer(n: number): number {
    const draw = super.integer(n);
    this.integers.push(draw);
    return draw;
  }

  override uniform(): number {
    const draw = super.uniform();
    this.uniforms.push(draw);
    return draw;
  }
}

/**
 * The rows scikit-learn's kmeans_plusplus picks, in order, given seedCentres's draws, and whether it
 * asked for every draw (a start that drew more numbers than scikit-learn uses differs from it).
 */
function scikitLearnPicks(
  values: Float64Array,
  width: number,
  k: number,
  random: RecordedRandom,
): { indices: number[]; allDrawsUsed: boolean } {
  return runPythonJson(
    `import json, sys
import numpy as np
from sklearn.cluster import kmeans_plusplus
given = json.load(sys.stdin)
class Replay(np.random.RandomState):
    def __init__(self, integers, uniforms):
        super().__init__(0)
        self.integers, self.uniforms = list(integers), list(uniforms)
    def randint(self, low, high=None, size=None, dtype=int):
        return self.integers.pop(0)
    def uniform(self, low=0.0, high=1.0, size=None):
        return np.array([self.uniforms.pop(0) for _ in range(size)])
replay = Replay(given["integers"], given["uniforms"])
X = np.array(given["values"], dtype=np.float64).reshape(-1, given["width"])
_, indices = kmeans_plusplus(X, n_clusters=given["k"], random_state=replay)
used = not replay.integers and not replay.uniforms
print(json.dumps({"indices": indices.tolist(), "allDrawsUsed": used}))`,
    {
      values: Array.from(values),
      width,
      k,
      integers: random.integers,
      uniforms: random.uniforms,
    },
  );
}

function expectScikitLearnStart(values: Float64Array, width: number, k: number, seed: number) {
  const random = new RecordedRandom(seed);
  const centres = seedCentres(values, width, k, random);
  const { indices, allDrawsUsed } = scikitLearnPicks(values, width, k, random);
  expect(allDrawsUsed).toBe(true);
  const picked = indices.flatMap((row) =>
    Array.from(values.subarray(row * width, (row + 1) * width)),
  );
  expect(Array.from(centres)).toEqual(picked);
}

describe("k-means++ start", () => {
  // k = 3, 12 and 40 take 3, 4 and 5 trials a round.
  it.each([3, 12, 40])(
    "picks scikit-learn's points on the penguins' measurements (k = %s)",
    (k) => {
      const { values, width } = standardizedPenguinMeasurements();
      expectScikitLearnStart(values, width, k, k);
    },
  );

  // Many centres in many dimensions, where most distances to a trial are ruled out by the triangle
  // inequality and never measured: the picks must still be those of measuring them all.
  it("picks scikit-learn's points on seeded data in 31 dimensions (k = 60)", () => {
    const random = new SeededRandom(5);
    const width = 31;
    const values = Float64Array.from({ length: 2000 * width }, () => random.normal());
    expectScikitLearnStart(values, width, 60, 9);
  });
});
