import type { PartitionSummary } from "@/lib/analysis/browser";
import { computeBarrierThreshold, formatFigure } from "./report-view";

/** α̂ is searched in [1e-3, 1e6] (methods.md §4); at the top it means "indistinguishable from IID". */
const ALPHA_CEILING = 1e6;

/** One key figure: its name, its value, what it is, and where this split sits on its scale. */
export interface FigureReading {
  name: string;
  value: string;
  what: string;
  scale: string;
}

const percent = (share: number) =>
  `${share < 0.01 && share > 0 ? "under 1" : Math.round(share * 100)}%`;

/**
 * ζ² as a share of all per-row gradient variance: by the law of total variance
 * σ²_pooled = σ² + ζ² (methods.md §3), so ζ²/σ²_pooled is the part of the variance that lies between
 * shards. 0 when the shards agree on average, 1 when rows within each shard agree.
 */
export function shareBetweenShards(summary: PartitionSummary): number | null {
  const { zeta2, sigma2Pooled } = summary.heterogeneity;
  return sigma2Pooled > 0 ? zeta2 / sigma2Pooled : null;
}

/** ζ*² against the barrier's threshold H²B²/R (methods.md §5); 1 or more means the barrier holds. */
export function barrierFraction(summary: PartitionSummary): number | null {
  const threshold = computeBarrierThreshold(summary);
  return threshold > 0 ? summary.heterogeneity.zeta2Star / threshold : null;
}

/**
 * Where the fitted Dirichlet concentration sits. α̂ is the total concentration; α̂/C is per class,
 * comparable with splits made as Dir(β·1) over C classes (α = β·C, methods.md §4). The bands follow
 * common practice in federated benchmarks, where β = 0.1 is strongly skewed and β ≥ 100 close to IID.
 */
export function describeConcentration(alpha: number, classes: number): string {
  if (alpha >= ALPHA_CEILING * 0.999) return "Indistinguishable from an IID split";
  const perClass = alpha / classes;
  if (perClass < 0.5) return "Strong label skew: most shards hold mainly a few classes";
  if (perClass < 5) return "Clear label skew: shards' mixes differ visibly from the pool";
  if (perClass < 100) return "Mild label skew";
  return "Close to an IID split";
}

/**
 * The key figures with a plain reading of each: what the quantity is in a data engineer's words,
 * and a scale that says whether this split's value is small or large.
 */
export function readKeyFigures(summary: PartitionSummary, shardCount: number): FigureReading[] {
  const { dataset, heterogeneity, labelSkew, quantitySkew, model, advice } = summary;
  const between = shareBetweenShards(summary);
  const barrier = barrierFraction(summary);
  const threshold = computeBarrierThreshold(summary);
  const coefficients = (dataset.classes ?? 1) * (dataset.features + 1);
  const categories = labelSkew.categories.length;
  const alpha = labelSkew.dirichletAlpha;
  const iid = alpha >= ALPHA_CEILING * 0.999;
  return [
    {
      name: "Rows · shards",
      value: `${dataset.rows.toLocaleString("en-US")} · ${shardCount.toLocaleString("en-US")}`,
      what: `${dataset.features} encoded features, ${dataset.classes === null ? "regression" : `${dataset.classes} classes`}.`,
      scale: `Shards hold ${quantitySkew.min.toLocaleString("en-US")}–${quantitySkew.max.toLocaleString("en-US")} rows.`,
    },
    {
      name: "ζ² — shard disagreement",
      value: formatFigure(heterogeneity.zeta2),
      what: "How far each shard's average gradient is from the whole dataset's, at the reference model (weighted gradient dissimilarity).",
      scale:
        between === null
          ? "No gradient variance at all, so there is nothing to compare it with."
          : `${percent(between)} of all per-row gradient variance lies between shards (0% = shards alike, 100% = rows within a shard alike).`,
    },
    {
      name: "ζ*² — at the optimum",
      value: formatFigure(heterogeneity.zeta2Star),
      what: "Shard disagreement at the pooled optimum W*: the value the heterogeneity barrier compares.",
      scale:
        barrier === null
          ? "The barrier threshold H²B²/R is zero, so no comparison is possible."
          : `${formatFigure(barrier, 2)}× the barrier H²B²/R = ${formatFigure(threshold)} for R = ${advice.rounds}; at 1× or more, local steps cannot beat minibatches order-wise.`,
    },
    {
      name: "ζ² max — along the path",
      value: formatFigure(heterogeneity.zeta2Max),
      what: "The largest disagreement between the training start and the optimum; the local SGD bound uses it.",
      scale:
        heterogeneity.zeta2Star > 0
          ? `${formatFigure(heterogeneity.zeta2Max / heterogeneity.zeta2Star, 2)}× ζ*²: shards disagree more on the way than at the end.`
          : "ζ*² is zero: the shards agree at the optimum.",
    },
    {
      name: "σ² — gradient noise",
      value: formatFigure(heterogeneity.sigma2),
      what: `How much single rows' gradients scatter within their shard; a batch of b = ${advice.batchSize} divides it by b.`,
      scale:
        heterogeneity.zeta2 > 0
          ? `${formatFigure(heterogeneity.sigma2 / heterogeneity.zeta2, 2)}× ζ²: ${heterogeneity.sigma2 >= heterogeneity.zeta2 ? "noise within shards outweighs differences between them" : "differences between shards outweigh the noise within them"}.`
          : "ζ² is zero: all the variance is noise within shards.",
    },
    {
      name: "H — curvature",
      value: formatFigure(heterogeneity.smoothness),
      what: "An upper bound on how sharply the loss bends; steps much larger than 1/H overshoot.",
      scale: smoothnessScale(summary),
    },
    {
      name: "B — distance to the optimum",
      value: formatFigure(model.distance),
      what: "How far the trained model lies from the all-zero start, ‖W* − W₀‖; every bound grows with B².",
      scale: `About ${formatFigure(model.distance / Math.sqrt(coefficients), 2)} per coefficient (root mean square over ${coefficients.toLocaleString("en-US")} coefficients).`,
    },
    {
      name: "Label skew",
      value: `TV ${formatFigure(labelSkew.tv)}`,
      what: "Total variation between a shard's label mix and the pooled mix, weighted by shard size.",
      scale: `0 = same mix as the pool, 1 = no label in common; the most skewed shard is at ${formatFigure(labelSkew.max.tv)}.`,
    },
    {
      name: "Dirichlet α̂ (total · per class)",
      value: iid
        ? "≈ IID"
        : `${formatFigure(alpha)} · ${formatFigure(alpha / Math.max(1, categories))}`,
      what: `The fitted concentration of the shards' label mixes: α̂ in total, and α̂/C = α̂/${categories} per ${dataset.task === "regression" ? "decile bin" : "class"}, comparable with a split made as Dirichlet(β) per class.`,
      scale: `${describeConcentration(alpha, Math.max(1, categories))} (per class: below 0.5 strong, 0.5–5 clear, 5–100 mild, above 100 close to IID).`,
    },
    {
      name: "Quantity skew",
      value: `Gini ${formatFigure(quantitySkew.gini)}`,
      what: `How unequal the shard sizes are (coefficient of variation ${formatFigure(quantitySkew.cv)}).`,
      scale: "0 = all shards the same size; near 1 = one shard holds almost every row.",
    },
  ];
}

/**
 * On standardized features plus a bias, X̃ᵀX̃/N is the features' correlation matrix beside a 1, so
 * its largest eigenvalue lies between 1 (uncorrelated features) and d (all features move together);
 * H is that times ½ for softmax, 1 for least squares, plus λ (methods.md §3).
 */
function smoothnessScale(summary: PartitionSummary): string {
  const factor = summary.dataset.task === "classification" ? 0.5 : 1;
  const d = Math.max(1, summary.dataset.features);
  const low = factor + summary.model.lambda;
  const high = factor * d + summary.model.lambda;
  return `Between ${formatFigure(low)} (uncorrelated features) and ${formatFigure(high)} (all ${d} features moving together) for this model.`;
}
