import { PATH_POINTS } from "../path-points";
import { AnalysisInputError } from "../errors";
import { sumFeaturesPerShard } from "../measure-feature-shift";
import { readTotals, type PassTotals } from "../objective-pass";
import type { ClientDesign } from "./client-rows";
import type { ClientPasses } from "./client-passes";
import {
  TARGET_HISTOGRAM_CELLS,
  type DigestEncoding,
  type GradientDigest,
  type MeasurementRequest,
  type PointSums,
} from "./digest-format";

/**
 * Round 2 of methods.md §9 for one client: per shard, Σℓᵢ, Σ∇ℓᵢ and Σ‖∇ℓᵢ‖² at the reference point,
 * Σℓᵢ and Σ∇ℓᵢ at t·W along the path (t ∈ {0, ¼, ½, ¾, 1}), Σx̃ᵢ, the label counts (or, for
 * regression, the standardized target's histogram on 4096 cells between the pooled min and max),
 * and once for the client Σx̃ᵢx̃ᵢᵀ. The sums come from the engine's own pass kernel
 * (objective-pass.ts), the same arithmetic as the central analysis.
 */
export function computeGradientDigest(
  client: string,
  clientPasses: ClientPasses,
  encoding: DigestEncoding,
  request: MeasurementRequest,
): GradientDigest {
  if (request.encodingHash !== encoding.hash) {
    throw new AnalysisInputError(
      `client "${client}": the request quotes encoding ${request.encodingHash.slice(0, 12)}…, not ${encoding.hash.slice(0, 12)}…`,
      { expected: "the encoding the coordinator sent for this analysis" },
    );
  }
  const { design } = clientPasses;
  const measure = (weights: Float64Array, withNoise: boolean): PassTotals[] =>
    clientPasses.passAt(weights, withNoise, true).shards;
  const atReference = measure(Float64Array.from(request.referenceWeights.flat()), true);
  const pathEnd = Float64Array.from(request.pathEnd.flat());
  const alongPath = PATH_POINTS.map((t) =>
    measure(
      pathEnd.map((value) => t * value),
      false,
    ),
  );
  const featureSums = sumFeaturesPerShard(design);
  const histograms = design.targets && histogramTargets(design, encoding);
  return {
    kind: "partita-gradient-digest",
    version: 1,
    client,
    encodingHash: encoding.hash,
    request,
    totalRows: design.totalRows,
    droppedRowsMissingLabel: design.droppedRowsMissingLabel,
    droppedRowsUnassigned: design.droppedRowsUnassigned,
    gram: clientPasses.computeGramSum(),
    shards: design.shardIds.map((id, m) => ({
      id,
      rows: design.shardOffsets[m + 1] - design.shardOffsets[m],
      labelCounts: design.labels && countLabels(design, m, encoding),
      targetHistogram: histograms && histograms[m],
      featureSums: Array.from(featureSums[m]),
      atReference: describeSums(atReference[m], true),
      alongPath: alongPath.map((point) => describeSums(point[m], false)),
    })),
  };
}

function describeSums(totals: PassTotals, withNoise: boolean): PointSums {
  const sums = readTotals(totals);
  return {
    lossSum: sums.loss,
    gradientSum: Array.from(sums.gradient),
    squaredGradientNormSum: withNoise ? sums.squaredNorms : null,
  };
}

function countLabels(design: ClientDesign, shard: number, encoding: DigestEncoding): number[] {
  const counts = new Array<number>((encoding.classes as string[]).length).fill(0);
  const labels = design.labels as Int32Array;
  for (let row = design.shardOffsets[shard]; row < design.shardOffsets[shard + 1]; row++) {
    counts[labels[row]]++;
  }
  return counts;
}

/**
 * Per shard, [cell, rows] of the non-empty cells among 4096 equal cells of the standardized target
 * between the pooled minimum and maximum (the maximum falls in the last cell).
 */
function histogramTargets(design: ClientDesign, encoding: DigestEncoding): [number, number][][] {
  const { mean, std, min, max } = encoding.target as NonNullable<DigestEncoding["target"]>;
  const low = (min - mean) / std;
  const span = (max - mean) / std - low;
  const targets = design.targets as Float64Array;
  return design.shardIds.map((_, m) => {
    const cells = new Map<number, number>();
    for (let row = design.shardOffsets[m]; row < design.shardOffsets[m + 1]; row++) {
      const cell = Math.min(
        TARGET_HISTOGRAM_CELLS - 1,
        Math.max(0, Math.floor(((targets[row] - low) / span) * TARGET_HISTOGRAM_CELLS)),
      );
      cells.set(cell, (cells.get(cell) ?? 0) + 1);
    }
    return [...cells.entries()].sort((a, b) => a[0] - b[0]);
  });
}
