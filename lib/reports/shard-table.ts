import type { reportShards } from "@/db/schema/analyses";

/** One row of a report's per-shard table, as stored in `report_shards`. */
export type ShardTableRow = Omit<typeof reportShards.$inferSelect, "reportId" | "ordinal">;

export type ShardColumnKey = Exclude<keyof ShardTableRow, "shardId">;

export interface ShardColumn {
  key: ShardColumnKey;
  /** Short heading for the page's table. */
  heading: string;
  /** What the number means, for the heading's title and screen readers. */
  description: string;
  /** Header in the CSV export: the key of the same figure in the JSON summary (methods.md §6). */
  csvHeader: string;
}

/** The numeric columns of the per-shard table, in the order the page and the CSV show them. */
export const SHARD_COLUMNS: ShardColumn[] = [
  { key: "rows", heading: "Rows", description: "Rows kept on the shard (nₘ)", csvHeader: "rows" },
  {
    key: "tv",
    heading: "TV",
    description: "Total variation distance of the shard's label mix from the pooled mix",
    csvHeader: "tv",
  },
  {
    key: "hellinger",
    heading: "Hellinger",
    description: "Hellinger distance of the label mix (½-convention, 0 to 1)",
    csvHeader: "hellinger",
  },
  {
    key: "js",
    heading: "JS",
    description: "Jensen–Shannon divergence of the label mix, in nats (at most ln 2)",
    csvHeader: "js",
  },
  {
    key: "kl",
    heading: "KL",
    description: "Kullback–Leibler divergence KL(q‖p) of the label mix, in nats",
    csvHeader: "kl",
  },
  {
    key: "gradNorm2",
    heading: "‖gₘ‖²",
    description: "Squared norm of the shard's gradient at the reference point",
    csvHeader: "gradNorm2",
  },
  {
    key: "sigma2",
    heading: "σₘ²",
    description: "Within-shard gradient noise at the reference point",
    csvHeader: "sigma2",
  },
  {
    key: "loss",
    heading: "Fₘ",
    description: "The shard's objective at the reference point",
    csvHeader: "loss",
  },
  {
    key: "classesPresent",
    heading: "Classes",
    description: "Label categories present on the shard",
    csvHeader: "classesPresent",
  },
  {
    key: "effectiveClasses",
    heading: "Eff. classes",
    description: "Effective number of classes, exp of the label entropy",
    csvHeader: "effectiveClasses",
  },
  {
    key: "featureShift",
    heading: "Feature shift",
    description: "RMS over features of the shard's mean in standardized units",
    csvHeader: "featureShift",
  },
];
