import type { Advice } from "./advise-plan";
import type { Task } from "./design";
import { measureGradientAgreement, type PointMeasurement } from "./measure-heterogeneity";
import type { LabelSkew } from "./measure-label-skew";
import type { QuantitySkew } from "./measure-quantity-skew";
import { PATH_POINTS } from "./path-points";
import type { PartitionSummary } from "./summary";
import { ENGINE_VERSION } from "./version";

/** The gradient-agreement matrix is reported up to this many shards (methods.md §3). */
export const MAX_AGREEMENT_SHARDS = 200;

/** What every §6 summary is assembled from, whether measured from rows or merged from digests. */
export interface SummaryParts {
  rows: number;
  /** d + 1: the encoded features and the bias. */
  width: number;
  task: Task;
  classNames: string[] | null;
  /** Regression read from the rows: each decile bin's label range (absent otherwise). */
  binRanges?: [number, number][];
  /** The shards in order (methods.md §1), with their kept rows and feature shift. */
  shards: { id: string; rows: number; featureShift: number }[];
  labelSkew: LabelSkew;
  quantitySkew: QuantitySkew;
  atReference: PointMeasurement;
  /** The measurements at W_t for t in PATH_POINTS, in that order. */
  path: PointMeasurement[];
  smoothness: number;
  advice: Advice;
  model: Omit<PartitionSummary["model"], "loss" | "gradNorm">;
  preprocessing: PartitionSummary["preprocessing"];
}

/**
 * The machine-readable summary of methods.md §6 from its measured parts: one definition of the
 * literal for the analysis of rows and the merge of digests (methods.md §9), so both name and
 * arrange every number the same way. ζ²max is the path's largest ζ², ζ*² the path end's, and the
 * gradient agreement is taken at W₀ = 0, the path's start (PATH_POINTS begins at t = 0).
 */
export function assembleSummary(parts: SummaryParts): PartitionSummary {
  const { labelSkew, atReference, path } = parts;
  return {
    engineVersion: ENGINE_VERSION,
    dataset: {
      rows: parts.rows,
      features: parts.width - 1,
      classes: parts.classNames === null ? null : parts.classNames.length,
      task: parts.task,
      classNames: parts.classNames,
    },
    shards: parts.shards.map((shard, m) => ({
      id: shard.id,
      rows: shard.rows,
      tv: labelSkew.shards[m].tv,
      hellinger: labelSkew.shards[m].hellinger,
      js: labelSkew.shards[m].js,
      kl: labelSkew.shards[m].kl,
      gradNorm2: atReference.shards[m].gradNorm2,
      sigma2: atReference.shards[m].sigma2,
      loss: atReference.shards[m].loss,
      classesPresent: labelSkew.shards[m].classesPresent,
      effectiveClasses: labelSkew.shards[m].effectiveClasses,
      featureShift: shard.featureShift,
      labelCounts: labelSkew.shards[m].counts,
    })),
    labelSkew: {
      tv: labelSkew.tv,
      hellinger: labelSkew.hellinger,
      js: labelSkew.js,
      kl: labelSkew.kl,
      dirichletAlpha: labelSkew.dirichletAlpha,
      max: labelSkew.max,
      categories: parts.classNames ?? labelSkew.pooled.map((_, bin) => `decile bin ${bin + 1}`),
      pooled: labelSkew.pooled,
      ...(parts.binRanges ? { binRanges: parts.binRanges } : {}),
    },
    quantitySkew: parts.quantitySkew,
    model: {
      lambda: parts.model.lambda,
      loss: atReference.loss,
      gradNorm: atReference.gradientNorm,
      distance: parts.model.distance,
      reference: parts.model.reference,
      optimum: parts.model.optimum,
      optimizer: parts.model.optimizer,
    },
    heterogeneity: {
      zeta2: atReference.zeta2,
      zeta2Uniform: atReference.zeta2Uniform,
      zeta2Max: Math.max(...path.map((point) => point.zeta2)),
      zeta2Star: path[path.length - 1].zeta2,
      sigma2: atReference.sigma2,
      sigma2Pooled: atReference.sigma2Pooled,
      smoothness: parts.smoothness,
      dissimilarity: atReference.dissimilarity,
      path: path.map((point, index) => ({
        t: PATH_POINTS[index],
        zeta2: point.zeta2,
        dissimilarity: point.dissimilarity,
        loss: point.loss,
      })),
      gradientAgreement:
        parts.shards.length <= MAX_AGREEMENT_SHARDS
          ? measureGradientAgreement(path[0].shards.map((shard) => shard.gradient))
          : null,
    },
    advice: parts.advice,
    preprocessing: parts.preprocessing,
  };
}
