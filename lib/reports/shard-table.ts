import type { reportShards } from "@/db/schema/analyses";
import type { PartitionSummary } from "@/lib/analysis";

/** One row of a report's per-shard table, as stored in `report_shards`. */
/** A row of the per-shard table: a shard's figures (its label counts feed only the charts). */
export type ShardTableRow = Omit<
  typeof reportShards.$inferSelect,
  "reportId" | "ordinal" | "labelCounts"
>;

export type ShardColumnKey = Exclude<keyof ShardTableRow, "shardId">;

export interface ShardColumn {
  key: ShardColumnKey;
  /** Short heading for the page's table. */
  heading: string;
  /** What the number means, for the heading's title and screen readers. */
  description: string;
  /**
   * For regression, where a row's "class" is its label's decile bin (methods.md §4), the heading
   * and description that say so.
   */
  regression?: { heading: string; description: string };
}

/** The shard id's column: the page's row headings and the CSV's first column. */
export const SHARD_ID_HEADING = "Shard";

/** The numeric columns of the per-shard table, in the order the page and the CSV show them. */
export const SHARD_COLUMNS: ShardColumn[] = [
  { key: "rows", heading: "Rows", description: "Rows kept on the shard (nₘ)" },
  {
    key: "tv",
    heading: "TV",
    description: "Total variation distance of the shard's label mix from the pooled mix",
  },
  {
    key: "hellinger",
    heading: "Hellinger",
    description: "Hellinger distance of the label mix (½-convention, 0 to 1)",
  },
  {
    key: "js",
    heading: "JS",
    description: "Jensen–Shannon divergence of the label mix, in nats (at most ln 2)",
  },
  {
    key: "kl",
    heading: "KL",
    description: "Kullback–Leibler divergence KL(q‖p) of the label mix, in nats",
  },
  {
    key: "gradNorm2",
    heading: "‖gₘ‖²",
    description: "Squared norm of the shard's gradient at the reference point",
  },
  {
    key: "sigma2",
    heading: "σₘ²",
    description: "Within-shard gradient noise at the reference point",
  },
  {
    key: "loss",
    heading: "Fₘ",
    description: "The shard's objective at the reference point",
  },
  {
    key: "classesPresent",
    heading: "Classes",
    description: "Label categories present on the shard",
    regression: {
      heading: "Label bins",
      description: "Decile bins of the label present on the shard",
    },
  },
  {
    key: "effectiveClasses",
    heading: "Eff. classes",
    description: "Effective number of classes, exp of the label entropy",
    regression: {
      heading: "Eff. bins",
      description: "Effective number of label bins, exp of the entropy of the shard's bin mix",
    },
  },
  {
    key: "featureShift",
    heading: "Feature shift",
    description: "RMS over features of the shard's mean in standardized units",
  },
];

/**
 * The numeric columns with the headings the page shows for this task; the CSV export uses the same
 * headings, so a downloaded table reads like the page's.
 */
export function shardColumnsFor(task: PartitionSummary["dataset"]["task"]): ShardColumn[] {
  return SHARD_COLUMNS.map((column) =>
    task === "regression" && column.regression ? { ...column, ...column.regression } : column,
  );
}
