import type { AnalysisOptions } from "../validation/analysis-options";
import { norm } from "../math/summation";
import { advisePlan } from "./advise-plan";
import { assembleSummary } from "./assemble-summary";
import { isDesignOnDisk, type EncodedDesign } from "./design";
import { AnalysisInputError } from "./errors";
import { fitReferenceModel } from "./fit-reference-model";
import {
  computeSmoothness,
  findNoiseCentres,
  measureAtPoint,
  type PointMeasurement,
} from "./measure-heterogeneity";
import { measureFeatureShift } from "./measure-feature-shift";
import { measureLabelSkew } from "./measure-label-skew";
import { measureQuantitySkew } from "./measure-quantity-skew";
import { measureLimitForRows } from "./memory-limit";
import { countWeightRows } from "./objective";
import type { DesignPasses, PassPool, PassResult } from "./pass-pool";
import { PATH_POINTS } from "./path-points";
import type { RawDataset } from "./read-dataset";
import { readGivenWeights } from "./reference-weights";
import {
  checkSimulationBudget,
  estimateSimulationCost,
  simulatePlan,
  type SimulationProgress,
} from "./simulation/simulate-plan";
import { StoredDesign } from "./stored-design";
import type { AnalysisProgress, PartitionSummary } from "./summary";

/** What the analysis of an encoded design needs besides the design and the options. */
export interface DesignAnalysisContext {
  /** Threads for the passes over the rows; the caller closes it. */
  pool: PassPool;
  /** Data rows in the file, kept or not (reported). */
  totalRows: number;
  /** The dataset's file format (reported). */
  format: RawDataset["format"];
  /** Where the shards came from (a partition map, the dataset's shard column), for messages. */
  partitionName: string;
  referenceName?: string;
  threads?: number;
  signal?: AbortSignal;
  onSimulationProgress?: (progress: SimulationProgress) => void;
}

/**
 * The analysis after reading and encoding (methods.md §2–§5, and §7 when asked): fit, measure,
 * advise. The layout planner encodes a dataset once and calls this once per candidate split.
 */
export async function analyzeDesign(
  design: EncodedDesign,
  options: AnalysisOptions,
  context: DesignAnalysisContext,
  onProgress: (progress: AnalysisProgress) => void = () => {},
): Promise<PartitionSummary> {
  const shardCount = design.shardIds.length;
  if (shardCount < 2) {
    throw new AnalysisInputError(`the partition has ${shardCount} shard`, {
      file: context.partitionName,
      expected: "at least two shards",
    });
  }
  const participants = options.participants ?? shardCount;
  if (participants > shardCount) {
    throw new AnalysisInputError(`is ${participants} participants per round`, {
      option: "participants",
      expected: `at most the number of shards (${shardCount})`,
    });
  }
  const plan = {
    participants,
    localSteps: options.localSteps,
    rounds: options.rounds,
    batchSize: options.batchSize,
  };
  if (options.simulate) {
    // Refuse before the fit, not after it: the cost is known once the design's width is.
    const { seeds, budget } = options.simulate;
    if (isDesignOnDisk(design)) throw refuseSimulationOnDisk(design);
    const weightRows = countWeightRows(design);
    checkSimulationBudget(
      estimateSimulationCost(plan, design.x.cols, weightRows, seeds),
      budget,
      plan,
      seeds,
    );
  }
  const passes: DesignPasses = isDesignOnDisk(design)
    ? new StoredDesign(context.pool, design)
    : context.pool.share(design, design.shardOffsets);
  const gram = passes.computeGram();
  const smoothness = computeSmoothness(gram, design.x.cols, design.task, options.lambda);
  onProgress({ stage: "encoding", fraction: 1 });

  onProgress({ stage: "fitting", fraction: 0 });
  const fitted = fitReferenceModel(design, passes, gram, options.lambda, (fraction) =>
    onProgress({ stage: "fitting", fraction }),
  );
  onProgress({ stage: "fitting", fraction: 1 });

  onProgress({ stage: "measuring", fraction: 0 });
  const reference = chooseReference(
    options.reference,
    design,
    fitted.weights,
    context.referenceName,
  );
  const summarize = (weights: Float64Array, pass: PassResult) =>
    measureAtPoint(design, weights, options.lambda, pass.shards, {
      withNoise: false,
      vanishingGradient: fitted.tolerance,
    });
  const measure = (weights: Float64Array) => summarize(weights, passes.evaluate(weights, false));
  // σₘ² by two passes (methods.md §3): the mean gradients first, then the deviations from them.
  const centres = findNoiseCentres(passes.evaluate(reference.weights, false));
  const atReference = measureAtPoint(
    design,
    reference.weights,
    options.lambda,
    passes.evaluate(reference.weights, true, centres).shards,
    { withNoise: true, vanishingGradient: fitted.tolerance, centres },
  );
  const path: PointMeasurement[] = [];
  for (const [index, t] of PATH_POINTS.entries()) {
    onProgress({ stage: "measuring", fraction: (index + 1) / (PATH_POINTS.length + 1) });
    const weights = fitted.weights.map((value) => t * value);
    // Passes already made at the same point: the fit's first, at W = 0, and the reference's at W*.
    if (t === 0) path.push(summarize(weights, fitted.atZero));
    else if (t === 1 && reference.kind === "optimum") path.push(atReference);
    else path.push(measure(weights));
  }
  const atOptimum = path[path.length - 1];
  const labelCounts = countLabelsPerShard(design);
  const labelSkew = measureLabelSkew(labelCounts);
  const quantitySkew = measureQuantitySkew(
    design.shardIds.map((_, m) => atReference.shards[m].rows),
  );
  const featureShift = measureFeatureShift(design);
  onProgress({ stage: "measuring", fraction: 1 });

  onProgress({ stage: "advising", fraction: 0 });
  const distance = norm(fitted.weights);
  const zeta2Max = Math.max(...path.map((point) => point.zeta2));
  const advice = advisePlan(
    {
      smoothness,
      distance,
      sigma2: atReference.sigma2,
      zeta2Max,
      participants,
      localSteps: options.localSteps,
      rounds: options.rounds,
      batchSize: options.batchSize,
    },
    atOptimum.zeta2,
  );
  onProgress({ stage: "advising", fraction: 1 });

  // A design on disk was refused above.
  const simulation =
    options.simulate && !isDesignOnDisk(design)
      ? await simulatePlan(
          {
            design,
            lambda: options.lambda,
            optimumValue: fitted.value,
            startValue: path[0].loss,
            smoothness,
            boundVerdict: advice.verdict,
          },
          plan,
          // A caller's thread count (e.g. 1 to stay on one core) holds for the simulation too.
          { ...options.simulate, threads: context.threads },
          { onProgress: context.onSimulationProgress, signal: context.signal },
        )
      : undefined;

  const summary = assembleSummary({
    rows: design.x.rows,
    width: design.x.cols,
    task: design.task,
    classNames: design.classes,
    binRanges: design.skewCategoryRanges,
    shards: design.shardIds.map((id, m) => ({
      id,
      rows: atReference.shards[m].rows,
      featureShift: featureShift[m],
    })),
    labelSkew,
    quantitySkew,
    atReference,
    path,
    smoothness,
    advice,
    model: {
      lambda: options.lambda,
      distance,
      reference: reference.kind,
      optimum: describeWeights(design, fitted.weights),
      optimizer: {
        converged: fitted.converged,
        iterations: fitted.iterations,
        evaluations: fitted.evaluations,
        gradNorm: fitted.gradientNorm,
        tolerance: fitted.tolerance,
      },
    },
    preprocessing: {
      totalRows: context.totalRows,
      droppedRowsMissingLabel: design.droppedRowsMissingLabel,
      droppedRowsUnassigned: design.droppedRowsUnassigned,
      format: context.format,
      badNumbersCountedMissing: design.badNumbersCountedMissing,
      featureNames: design.featureNames,
      omittedColumns: design.omittedColumns,
      warnings: design.warnings,
    },
  });
  return simulation ? { ...summary, simulation } : summary;
}

/** The simulation draws minibatches from anywhere in the rows: it needs them in memory. */
function refuseSimulationOnDisk(design: EncodedDesign): AnalysisInputError {
  const designBytes = design.x.rows * design.x.cols * Float64Array.BYTES_PER_ELEMENT;
  const mebibytes = (bytes: number) => Math.ceil(bytes / 2 ** 20);
  return new AnalysisInputError(
    `the simulation needs the encoded rows in memory (${mebibytes(designBytes)} MiB), more than the memory limit leaves for them`,
    {
      option: "simulate",
      expected: `a memory limit of at least ${mebibytes(measureLimitForRows(designBytes))} MiB (--memory-limit or PARTITA_MEMORY_LIMIT), or the analysis without the simulation`,
    },
  );
}

function countLabelsPerShard(design: EncodedDesign): number[][] {
  return design.shardIds.map((_, m) => {
    const counts = new Array<number>(design.skewCategoryCount).fill(0);
    for (let row = design.shardOffsets[m]; row < design.shardOffsets[m + 1]; row++) {
      counts[design.skewCategories[row]]++;
    }
    return counts;
  });
}

function describeWeights(
  design: EncodedDesign,
  weights: Float64Array,
): PartitionSummary["model"]["optimum"] {
  const width = design.x.cols;
  return {
    classes: design.classes,
    features: design.featureNames,
    weights: Array.from({ length: countWeightRows(design) }, (_, c) =>
      Array.from(weights.subarray(c * width, (c + 1) * width)),
    ),
  };
}

function chooseReference(
  reference: AnalysisOptions["reference"],
  design: EncodedDesign,
  optimum: Float64Array,
  referenceName = "reference weights",
): { kind: "optimum" | "zero" | "given"; weights: Float64Array } {
  if (reference === "optimum") return { kind: "optimum", weights: optimum };
  if (reference === "zero") return { kind: "zero", weights: new Float64Array(optimum.length) };
  const shape = {
    featureNames: design.featureNames,
    classes: design.classes,
    width: design.x.cols,
  };
  return { kind: "given", weights: readGivenWeights(reference, shape, referenceName) };
}
