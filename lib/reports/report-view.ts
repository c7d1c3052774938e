import type { PartitionSummary, ShardSummary, Verdict } from "@/lib/analysis/browser";

export const VERDICT_LABELS: Record<Verdict, string> = {
  "local-updates": "Local updates",
  "large-minibatch": "Large minibatches",
  "no-clear-winner": "No clear winner",
};

/** What each verdict means for the plan, in one plain sentence. */
export const VERDICT_MEANINGS: Record<Verdict, string> = {
  "local-updates":
    "Many local steps between averaging rounds should reach a given accuracy with less communication than synchronized minibatches.",
  "large-minibatch":
    "Fewer, larger synchronized minibatches should do better than local steps on this split.",
  "no-clear-winner":
    "The two bounds are within a factor of two of each other; the bounds cannot tell the approaches apart.",
};

/**
 * A number for reading, not for computing: three significant digits, scientific notation outside
 * 1e-3…1e6, a dash where the engine had no value (null, or NaN/∞ that JSON turned into null).
 */
export function formatFigure(value: number | null | undefined, digits = 3): string {
  if (value === null || value === undefined || !Number.isFinite(value)) return "—";
  if (value === 0) return "0";
  const magnitude = Math.abs(value);
  if (magnitude < 1e-3 || magnitude >= 1e6) {
    const [mantissa, exponent] = value.toExponential(digits - 1).split("e");
    return `${mantissa}×10${toSuperscript(Number(exponent))}`;
  }
  return Number(value.toPrecision(digits)).toLocaleString("en-US", {
    maximumSignificantDigits: digits,
  });
}

const SUPERSCRIPT_DIGITS = "⁰¹²³⁴⁵⁶⁷⁸⁹";

function toSuperscript(exponent: number): string {
  const digits = String(Math.abs(exponent))
    .split("")
    .map((digit) => SUPERSCRIPT_DIGITS[Number(digit)])
    .join("");
  return exponent < 0 ? `⁻${digits}` : digits;
}

/** Dates in reports are shown in UTC so every reader of a shared report sees the same day. */
export function formatReportDate(date: Date): string {
  return `${date.toISOString().slice(0, 16).replace("T", " ")} UTC`;
}

/** The heterogeneity barrier's threshold H²B²/R for the report's plan (methods.md §5). */
export function computeBarrierThreshold(summary: PartitionSummary): number {
  const { smoothness } = summary.heterogeneity;
  const { distance } = summary.model;
  return (smoothness * smoothness * distance * distance) / summary.advice.rounds;
}

export type DivergenceMetric = "tv" | "js";

export const DIVERGENCE_NAMES: Record<DivergenceMetric, string> = {
  tv: "Total variation",
  js: "Jensen–Shannon (nats)",
};

/** Shards by divergence of their label mix from the pooled mix, largest first (ties: stored order). */
export function rankShardsByDivergence(
  shards: ShardSummary[],
  metric: DivergenceMetric,
): ShardSummary[] {
  return shards
    .map((shard, index) => ({ shard, index }))
    .sort((a, b) => (b.shard[metric] ?? 0) - (a.shard[metric] ?? 0) || a.index - b.index)
    .map(({ shard }) => shard);
}

/**
 * The shards the divergence chart can draw: the `cap` largest by each measure, in stored order. The
 * chart ranks and cuts what it is given, so its bars are the same as from every shard, while the
 * page sends at most 2·cap shards to the browser however many the report has.
 */
export function selectDivergenceCandidates(
  shards: ShardSummary[],
  cap: number,
): { name: string; tv: number; js: number }[] {
  if (shards.length <= cap) return shards.map(({ id, tv, js }) => ({ name: id, tv, js }));
  const chosen = new Set(
    (Object.keys(DIVERGENCE_NAMES) as DivergenceMetric[]).flatMap((metric) =>
      rankShardsByDivergence(shards, metric).slice(0, cap),
    ),
  );
  return shards
    .filter((shard) => chosen.has(shard))
    .map(({ id, tv, js }) => ({ name: id, tv, js }));
}

/**
 * One bar of the label-mix chart: a unique key (the pooled bar's key cannot clash with a shard id),
 * the name to show, the rows behind it, and the share of each category under keys c0, c1, …
 */
export type LabelMixBar = { key: string; name: string; rows: number } & Record<
  `c${number}`,
  number
>;

export interface LabelMix {
  /** Category names; bar keys are `c${index}` so user label names never collide with field names. */
  categories: string[];
  /** The pooled mix first, then the shards shown. */
  bars: LabelMixBar[];
  shownShards: number;
  totalShards: number;
  /** True when the shards are the most divergent ones (by total variation) rather than all of them. */
  capped: boolean;
}

export const POOLED_BAR_NAME = "All shards";
const POOLED_BAR_KEY = "pooled";

/**
 * The label mix per shard as shares of its rows. All shards in stored order when they fit under the
 * cap; otherwise the `cap` most divergent by total variation, most divergent first. `totalShards`
 * counts every shard of the report; `summary.shards` may hold only the most divergent of them.
 */
export function buildLabelMix(
  summary: PartitionSummary,
  cap: number,
  totalShards: number,
): LabelMix {
  const { categories, pooled } = summary.labelSkew;
  const capped = totalShards > cap;
  const shown = capped
    ? rankShardsByDivergence(summary.shards, "tv").slice(0, cap)
    : summary.shards;
  const toBar = (key: string, name: string, rows: number, shares: number[]): LabelMixBar => {
    const bar: LabelMixBar = { key, name, rows };
    shares.forEach((share, index) => {
      bar[`c${index}`] = share;
    });
    return bar;
  };
  return {
    categories,
    bars: [
      toBar(POOLED_BAR_KEY, POOLED_BAR_NAME, summary.dataset.rows, pooled),
      ...shown.map((shard, index) =>
        toBar(
          `shard-${index}`,
          shard.id,
          shard.rows,
          shard.labelCounts.map((count) => (shard.rows > 0 ? count / shard.rows : 0)),
        ),
      ),
    ],
    shownShards: shown.length,
    totalShards,
    capped,
  };
}

/**
 * Decades for a logarithmic axis that covers every positive value: the powers of ten from the one
 * at or below the smallest value to the one at or above the largest.
 */
export function spanDecades(values: number[]): number[] {
  const positive = values.filter((value) => value > 0 && Number.isFinite(value));
  if (positive.length === 0) return [1];
  const low = Math.floor(Math.log10(Math.min(...positive)));
  const high = Math.ceil(Math.log10(Math.max(...positive)));
  return Array.from({ length: Math.max(1, high - low) + 1 }, (_, index) => 10 ** (low + index));
}

/** A power of ten as 10ⁿ (1, 10 and 0.1 stay plain); anything else through formatFigure. */
export function formatDecade(value: number): string {
  const exponent = Math.round(Math.log10(value));
  if (Math.abs(value / 10 ** exponent - 1) > 1e-9) return formatFigure(value, 2);
  if (exponent >= -1 && exponent <= 1) return String(10 ** exponent);
  return `10${toSuperscript(exponent)}`;
}
