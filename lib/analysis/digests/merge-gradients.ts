import { norm } from "../../math/summation";
import { advisePlan } from "../advise-plan";
import { assembleSummary } from "../assemble-summary";
import { PATH_POINTS } from "../path-points";
import { compareCodePoints } from "../code-point-order";
import { AnalysisInputError } from "../errors";
import { OPTIMUM_RELATIVE_TOLERANCE } from "../fit-reference-model";
import { measureFeatureShiftFromSums } from "../measure-feature-shift";
import { computeSmoothness, measureAtPoint, type PointMeasurement } from "../measure-heterogeneity";
import { measureLabelSkew } from "../measure-label-skew";
import { measureQuantitySkew } from "../measure-quantity-skew";
import { createTotals, type PassTotals } from "../objective-pass";
import type { PartitionSummary } from "../summary";
import {
  hashDocument,
  type DigestEncoding,
  type GradientDigest,
  type PointSums,
  type ShardGradientDigest,
} from "./digest-format";
import { binHistogramIntoDeciles } from "./histogram-deciles";

/** The plan of methods.md §5 (participants default: every shard). */
export interface DigestPlan {
  participants?: number;
  localSteps: number;
  rounds: number;
  batchSize: number;
}

/** The coordinator's fit of W* from the clients' evaluations (fit-pooled-optimum.ts). */
export interface PooledFit {
  weights: Float64Array;
  converged: boolean;
  iterations: number;
  evaluations: number;
  gradientNorm: number;
  tolerance: number;
}

export interface MergeGradientsOptions {
  lambda: number;
  plan: DigestPlan;
  /** W* when the coordinator fitted it; without, the request's path end stands in for it. */
  fit?: PooledFit;
  /** Clients expected but left out when the analyst closed the roster. */
  missingClients?: string[];
}

/**
 * The coordinator's side of round 2 (methods.md §9): checks the gradient digests (encoding hash,
 * the same request, no shard twice, none under the minimum rows, every shard of round 1 present),
 * turns each shard's sums into the totals the engine's own §3 measurement reads, and builds the §6
 * summary with the engine's §3–§5 functions: gₘ = Σ∇ℓᵢ/nₘ + λW̄, σₘ² = Σ‖∇ℓᵢ‖²/nₘ − ‖Σ∇ℓᵢ/nₘ‖², H from
 * the merged Σx̃x̃ᵀ/N, label skew from the counts (for regression from the 4096-cell histogram),
 * feature shift from Σx̃, and the advice.
 */
export function mergeGradientDigests(
  encoding: DigestEncoding,
  digests: GradientDigest[],
  options: MergeGradientsOptions,
): PartitionSummary {
  const request = checkDigests(encoding, digests);
  const width = encoding.columns.length + 1;
  const weightRows = encoding.classes === null ? 1 : encoding.classes.length;
  const shards = digests
    .flatMap((digest) => digest.shards.map((shard) => ({ ...shard, client: digest.client })))
    .sort((a, b) => compareCodePoints(a.id, b.id));
  for (const shard of shards) checkShardShape(shard, width * weightRows, width - 1);
  const shardIds = shards.map((shard) => shard.id);
  const rows = encoding.rows;
  const shape = { x: { rows, cols: width, data: new Float64Array(0) }, shardIds };
  const { lambda } = options;

  const pathEnd = Float64Array.from(request.pathEnd.flat());
  const atZero = PATH_POINTS.indexOf(0);
  const pathTotals = PATH_POINTS.map((_, index) =>
    shards.map((shard) => toTotals(shard.rows, shard.alongPath[index])),
  );
  const zeroGradient = measureAtPoint(
    shape,
    new Float64Array(pathEnd.length),
    lambda,
    pathTotals[atZero],
    { withNoise: false, vanishingGradient: 0 },
  ).gradientNorm;
  const tolerance =
    options.fit?.tolerance ?? OPTIMUM_RELATIVE_TOLERANCE * Math.max(1, zeroGradient);
  const measure = { vanishingGradient: tolerance };
  const referenceWeights = Float64Array.from(request.referenceWeights.flat());
  const atReference = measureAtPoint(
    shape,
    referenceWeights,
    lambda,
    shards.map((shard) => toTotals(shard.rows, shard.atReference)),
    { withNoise: true, ...measure },
  );
  const path: PointMeasurement[] = PATH_POINTS.map((t, index) =>
    measureAtPoint(
      shape,
      pathEnd.map((value) => t * value),
      lambda,
      pathTotals[index],
      { withNoise: false, ...measure },
    ),
  );
  const atOptimum = path[path.length - 1];

  const gram = new Float64Array(width * width);
  for (const digest of digests) {
    digest.gram.forEach((row, j) => row.forEach((value, k) => (gram[j * width + k] += value)));
  }
  for (let k = 0; k < gram.length; k++) gram[k] /= rows;
  const smoothness = computeSmoothness(gram, width, encoding.task, lambda);

  const skew = countSkewCategories(encoding, shards);
  const labelSkew = measureLabelSkew(skew.counts);
  const quantitySkew = measureQuantitySkew(shards.map((shard) => shard.rows));
  const participants = options.plan.participants ?? shards.length;
  if (participants > shards.length) {
    throw new AnalysisInputError(`the plan has ${participants} participants per round`, {
      column: "participants",
      expected: `at most the number of shards (${shards.length})`,
    });
  }
  const distance = norm(pathEnd);
  const zeta2Max = Math.max(...path.map((point) => point.zeta2));
  const advice = advisePlan(
    { ...options.plan, smoothness, distance, sigma2: atReference.sigma2, zeta2Max, participants },
    atOptimum.zeta2,
  );

  const fit = options.fit;
  const warnings = [...encoding.warnings];
  if (!fit) {
    warnings.push(
      "built from digests without a fit: the supplied point stands in for the pooled optimum W* (distance B and the path t·W)",
    );
  }
  if (skew.fromHistogram) {
    warnings.push(
      "regression label skew: the decile bins come from a 4096-cell histogram of the target, not from the exact quantiles",
    );
  }
  const clientsInOrder = digests.map((digest) => ({
    client: digest.client,
    shards: digest.shards.map((shard) => shard.id).sort(compareCodePoints),
    rows: digest.shards.reduce((total, shard) => total + shard.rows, 0),
  }));
  const summary = assembleSummary({
    rows,
    width,
    task: encoding.task,
    classNames: encoding.classes,
    shards: shards.map((shard) => ({
      id: shard.id,
      rows: shard.rows,
      featureShift: measureFeatureShiftFromSums(shard.featureSums, shard.rows),
    })),
    labelSkew,
    quantitySkew,
    atReference,
    path,
    smoothness,
    advice,
    model: {
      lambda,
      distance,
      reference: request.reference,
      optimum: {
        classes: encoding.classes,
        features: encoding.featureNames,
        weights: request.pathEnd,
      },
      optimizer: {
        converged: fit?.converged ?? false,
        iterations: fit?.iterations ?? 0,
        evaluations: fit?.evaluations ?? 0,
        gradNorm: fit?.gradientNorm ?? atOptimum.gradientNorm,
        tolerance,
      },
    },
    preprocessing: {
      totalRows: digests.reduce((total, digest) => total + digest.totalRows, 0),
      droppedRowsMissingLabel: digests.reduce((n, digest) => n + digest.droppedRowsMissingLabel, 0),
      droppedRowsUnassigned: digests.reduce((n, digest) => n + digest.droppedRowsUnassigned, 0),
      // Each client read its own files; the coordinator never sees their text.
      format: null,
      badNumbersCountedMissing: [],
      featureNames: encoding.featureNames,
      omittedColumns: encoding.omittedColumns,
      warnings,
    },
  });
  return {
    ...summary,
    digests: {
      encodingHash: encoding.hash,
      clients: clientsInOrder,
      missingClients: options.missingClients ?? [],
      fitted: fit !== undefined,
      labelSkewFromHistogram: skew.fromHistogram,
    },
  };
}

/** A shard's sums as the totals a pass would have produced (their compensation already applied). */
function toTotals(rows: number, sums: PointSums): PassTotals {
  const totals = createTotals(sums.gradientSum.length);
  totals.rows = rows;
  totals.lossSum = sums.lossSum;
  totals.gradientSum.set(sums.gradientSum);
  totals.squaredGradientNormSum = sums.squaredGradientNormSum ?? 0;
  return totals;
}

/** Checks every digest belongs together and covers round 1; answers their common request. */
function checkDigests(
  encoding: DigestEncoding,
  digests: GradientDigest[],
): GradientDigest["request"] {
  if (digests.length === 0) {
    throw new AnalysisInputError("no gradient digests were given", {
      expected: "one gradient digest per client",
    });
  }
  const requestHash = hashDocument(digests[0].request);
  const clients = new Set<string>();
  const ownerOfShard = new Map<string, string>();
  let rows = 0;
  for (const digest of digests) {
    if (digest.encodingHash !== encoding.hash || digest.request.encodingHash !== encoding.hash) {
      throw new AnalysisInputError(
        `client "${digest.client}" sent digests for encoding ${digest.encodingHash.slice(0, 12)}…, not this analysis's ${encoding.hash.slice(0, 12)}…`,
        { expected: "digests computed with this analysis's encoding" },
      );
    }
    if (hashDocument(digest.request) !== requestHash) {
      throw new AnalysisInputError(
        `client "${digest.client}" measured at other points than client "${digests[0].client}"`,
        { expected: "every client's digest made for the same reference and path" },
      );
    }
    if (clients.has(digest.client)) {
      throw new AnalysisInputError(`client "${digest.client}" sent two gradient digests`, {
        expected: "one gradient digest per client",
      });
    }
    clients.add(digest.client);
    for (const shard of digest.shards) {
      const owner = ownerOfShard.get(shard.id);
      if (owner !== undefined) {
        throw new AnalysisInputError(
          `shard "${shard.id}" was sent twice (by client "${owner}" and by client "${digest.client}")`,
          { expected: "every shard held by exactly one client" },
        );
      }
      ownerOfShard.set(shard.id, digest.client);
      if (shard.rows < encoding.minimumShardRows) {
        throw new AnalysisInputError(
          `client "${digest.client}", shard "${shard.id}" has ${shard.rows} rows, under the minimum of ${encoding.minimumShardRows}`,
          { expected: `at least ${encoding.minimumShardRows} kept rows per shard` },
        );
      }
      rows += shard.rows;
    }
  }
  if (rows !== encoding.rows || ownerOfShard.size !== encoding.shardCount) {
    throw new AnalysisInputError(
      `the gradient digests cover ${ownerOfShard.size} shards and ${rows} rows, round 1 had ${encoding.shardCount} shards and ${encoding.rows} rows`,
      { expected: "a gradient digest from every client of round 1" },
    );
  }
  return digests[0].request;
}

function checkShardShape(
  shard: ShardGradientDigest & { client: string },
  parameters: number,
  features: number,
): void {
  const sums = [shard.atReference, ...shard.alongPath];
  const wrong =
    shard.alongPath.length !== PATH_POINTS.length ||
    sums.some((point) => point.gradientSum.length !== parameters) ||
    shard.atReference.squaredGradientNormSum === null ||
    shard.featureSums.length !== features;
  if (wrong) {
    throw new AnalysisInputError(
      `client "${shard.client}", shard "${shard.id}": the digest's sums have the wrong shape`,
      {
        expected: `${PATH_POINTS.length} path points, gradients of ${parameters} numbers and ${features} feature sums`,
      },
    );
  }
}

/** Per shard, rows per label-skew category: the classes, or the target's decile bins. */
function countSkewCategories(
  encoding: DigestEncoding,
  shards: ShardGradientDigest[],
): { counts: number[][]; fromHistogram: boolean } {
  if (encoding.classes !== null) {
    return {
      counts: shards.map(
        (shard) => shard.labelCounts ?? new Array(encoding.classes!.length).fill(0),
      ),
      fromHistogram: false,
    };
  }
  const { binOfCell, binCount } = binHistogramIntoDeciles(
    shards.map((shard) => shard.targetHistogram ?? []),
  );
  return {
    counts: shards.map((shard) => {
      const counts = new Array<number>(binCount).fill(0);
      for (const [cell, count] of shard.targetHistogram ?? []) counts[binOfCell[cell]] += count;
      return counts;
    }),
    fromHistogram: true,
  };
}
