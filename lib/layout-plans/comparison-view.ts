import type { LayoutCandidateRow, LayoutPlanView } from "@/db/queries/layout-plans";
import {
  rankLayouts,
  type LayoutCandidate,
  type LayoutComparison,
  type PartitionSummary,
  type Verdict,
} from "@/lib/analysis/browser";

/** One scored candidate as a row of the comparison table (methods.md §8's columns). */
export interface ComparisonRow {
  ordinal: number;
  name: string;
  generator: string;
  parameters: string;
  seed: number;
  shards: number;
  tv: number;
  tvMax: number;
  js: number;
  jsMax: number;
  alpha: number;
  /** α̂ / C: the concentration per class, comparable across label counts. */
  alphaPerClass: number;
  gini: number;
  zeta2Star: number;
  zeta2Max: number;
  sigma2: number;
  ratio: number | null;
  verdict: Verdict;
  barrier: boolean;
  /** Each shard's label shares, for the small label-mix picture. */
  mix: number[][];
  categories: string[];
}

/** The candidates scored so far as §8's candidates, ranked by ρ, then by weighted JS. */
export function rankedCandidates(plan: LayoutPlanView): (LayoutCandidate & { ordinal: number })[] {
  const scored = plan.candidates.filter(
    (row): row is LayoutCandidateRow & { summary: PartitionSummary } =>
      row.status === "succeeded" && row.summary !== null,
  );
  const ordinalOf = new Map(scored.map((row) => [row.name, row.ordinal]));
  return rankLayouts(
    scored.map((row) => ({
      name: row.name,
      generator: row.generator,
      parameters: row.parameters,
      seed: plan.seed,
      shards: row.summary.shards.length,
      summary: row.summary,
    })),
  ).map((candidate) => ({ ...candidate, ordinal: ordinalOf.get(candidate.name) as number }));
}

/** The table's rows, in rank order. */
export function buildComparisonRows(plan: LayoutPlanView): ComparisonRow[] {
  return rankedCandidates(plan).map(({ ordinal, name, generator, parameters, seed, summary }) => {
    const classes = summary.labelSkew.categories.length;
    return {
      ordinal,
      name,
      generator,
      parameters: describeParameters(parameters),
      seed,
      shards: summary.shards.length,
      tv: summary.labelSkew.tv,
      tvMax: summary.labelSkew.max.tv,
      js: summary.labelSkew.js,
      jsMax: summary.labelSkew.max.js,
      alpha: summary.labelSkew.dirichletAlpha,
      alphaPerClass: summary.labelSkew.dirichletAlpha / classes,
      gini: summary.quantitySkew.gini,
      zeta2Star: summary.heterogeneity.zeta2Star,
      zeta2Max: summary.heterogeneity.zeta2Max,
      sigma2: summary.heterogeneity.sigma2,
      ratio: summary.advice.ratio,
      verdict: summary.advice.verdict,
      barrier: summary.advice.heterogeneityBarrier,
      mix: summary.shards.map((shard) =>
        shard.labelCounts.map((count) => (shard.rows > 0 ? count / shard.rows : 0)),
      ),
      categories: summary.labelSkew.categories,
    };
  });
}

/** "α = 0.5", "k = 2", or "—" for a generator without parameters. */
export function describeParameters(parameters: Record<string, number>): string {
  const symbols: Record<string, string> = { alpha: "α", betaPerClass: "β per class", beta: "β" };
  const parts = Object.entries(parameters).map(
    ([key, value]) => `${symbols[key] ?? key} = ${value}`,
  );
  return parts.length > 0 ? parts.join(", ") : "—";
}

/**
 * The comparison as `npm run layouts` writes layouts.json (methods.md §8's keys): the scored
 * candidates ranked, the failed ones with their messages, M and the group column.
 */
export function buildComparisonJson(plan: LayoutPlanView): LayoutComparison {
  return {
    layouts: rankedCandidates(plan).map((candidate) => ({
      name: candidate.name,
      generator: candidate.generator,
      parameters: candidate.parameters,
      seed: candidate.seed,
      shards: candidate.shards,
      summary: candidate.summary,
    })),
    failures: plan.candidates
      .filter((row) => row.status === "failed")
      .map((row) => ({
        name: row.name,
        generator: row.generator,
        parameters: row.parameters,
        seed: plan.seed,
        message: row.failureMessage ?? "",
        badInput: row.failedOnInput,
      })),
    shardCount: plan.shardCount,
    groupColumn: plan.groupColumn,
  };
}
