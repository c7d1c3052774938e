import { MAX_AGREEMENT_SHARDS } from "@/lib/analysis/browser";

/**
 * How many shards a report page's charts need. Up to ALL_CHART_SHARDS (as many as the engine
 * computes the gradient-agreement matrix for) they get every shard; above it only the
 * TOP_CHART_SHARDS most divergent by TV and by JS, since no chart draws more shards than that.
 */
export const ALL_CHART_SHARDS = MAX_AGREEMENT_SHARDS;
export const TOP_CHART_SHARDS = 40;
