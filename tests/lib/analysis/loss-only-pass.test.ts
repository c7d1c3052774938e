import { beforeAll, describe, expect, it } from "vitest";
import type { Design } from "@/lib/analysis/design";
import { countWeightRows } from "@/lib/analysis/objective";
import {
  accumulateLoss,
  accumulatePass,
  createTotals,
  createWorkspace,
} from "@/lib/analysis/objective-pass";
import { runPythonJson } from "./support/run-python";
import { designOf, exportDesign, penguinsWithShards } from "./support/simulation-data";

// Open data: the vega-datasets penguins (BSD-3-Clause), one shard per island: species for softmax,
// body mass for least squares. The main check is the promise of `accumulateLoss` (the simulation's
// curve relies on it): its loss is the full pass's loss bit for bit. The loss itself is checked
// against SciPy's logsumexp and NumPy (methods.md §2's ℓᵢ).

let classification: Design;
let regression: Design;

beforeAll(async () => {
  const csv = penguinsWithShards((_, record) => record.Island);
  classification = await designOf(csv, "Species");
  regression = await designOf(csv, "Body Mass (g)", "regression");
});

/** A point away from zero with every entry different, so every score and residual differs. */
function pointFor(design: Design): Float64Array {
  const size = countWeightRows(design) * design.x.cols;
  return Float64Array.from({ length: size }, (_, k) => 0.3 * Math.sin(1.7 * k + 0.4));
}

/**
 * Row ranges: all rows (more than one 256-row block), one shard, and a range whose start and length
 * are not multiples of the kernel's 4-row groups, so the single-row tail runs too.
 */
function rangesFor(design: Design): [number, number][] {
  return [
    [0, design.x.rows],
    [design.shardOffsets[1], design.shardOffsets[2]],
    [3, design.x.rows - 6],
  ];
}

/**
 * A finite value in every gradient entry, so any write by a loss-only pass shows (NaN would hide
 * one: NaN plus anything is NaN again).
 */
const UNTOUCHED = 0.75;

describe.each([
  ["classification", () => classification],
  ["least squares", () => regression],
])("loss-only pass on the penguins (%s)", (_, designFor) => {
  it("gives the full pass's loss sum and compensation bit for bit, and writes no gradient", () => {
    const design = designFor();
    const weights = pointFor(design);
    const width = design.x.cols;
    const weightRows = countWeightRows(design);
    for (const [rowStart, rowEnd] of rangesFor(design)) {
      const full = createTotals(weights.length);
      accumulatePass(
        design,
        weights,
        rowStart,
        rowEnd,
        full,
        createWorkspace(weightRows, width),
        false,
      );
      const withNorms = createTotals(weights.length);
      accumulatePass(
        design,
        weights,
        rowStart,
        rowEnd,
        withNorms,
        createWorkspace(weightRows, width),
        true,
      );

      const lossOnly = createTotals(weights.length);
      lossOnly.gradientSum.fill(UNTOUCHED);
      lossOnly.gradientCompensation.fill(UNTOUCHED);
      const workspace = createWorkspace(weightRows, width);
      workspace.blockGradient.fill(UNTOUCHED);
      accumulateLoss(design, weights, rowStart, rowEnd, lossOnly, workspace);

      expect(lossOnly.rows).toBe(rowEnd - rowStart);
      // toBe compares with Object.is: the same double, not merely close.
      expect(lossOnly.lossSum).toBe(full.lossSum);
      expect(lossOnly.lossCompensation).toBe(full.lossCompensation);
      expect(lossOnly.lossSum).toBe(withNorms.lossSum);
      expect(lossOnly.lossCompensation).toBe(withNorms.lossCompensation);
      expect(lossOnly.squaredGradientNormSum).toBe(0);
      expect(lossOnly.pooledSquaredDeviationSum).toBe(0);
      const untouched = (values: Float64Array) => values.every((value) => value === UNTOUCHED);
      expect(untouched(lossOnly.gradientSum)).toBe(true);
      expect(untouched(lossOnly.gradientCompensation)).toBe(true);
      expect(untouched(workspace.blockGradient)).toBe(true);
    }
  });

  it("sums the loss NumPy and SciPy compute for the same rows and point", () => {
    const design = designFor();
    const weights = pointFor(design);
    const totals = createTotals(weights.length);
    accumulateLoss(
      design,
      weights,
      0,
      design.x.rows,
      totals,
      createWorkspace(countWeightRows(design), design.x.cols),
    );
    const expected = runPythonJson<number>(
      `import json,sys
import numpy as np
from scipy.special import logsumexp
d=json.load(sys.stdin)
x=np.array(d["x"]).reshape(d["rows"],d["cols"])
w=np.array(d["weights"]).reshape(d["classes"],d["cols"])
s=x@w.T
if d["labels"] is None:
    r=s[:,0]-np.array(d["targets"]); print(json.dumps(float(np.sum(0.5*r*r))))
else:
    y=np.array(d["labels"]); print(json.dumps(float(np.sum(logsumexp(s,axis=1)-s[np.arange(len(y)),y]))))`,
      { ...exportDesign(design), weights: Array.from(weights) },
    );
    const loss = totals.lossSum + totals.lossCompensation;
    expect(Math.abs(loss - expected)).toBeLessThan(1e-12 * Math.abs(expected));
  });
});
