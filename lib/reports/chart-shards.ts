/**
 * How many shards a report page's charts need. Up to ALL_CHART_SHARDS (the engine computes the
 * gradient-agreement matrix up to 200 shards) they get every shard; above it only the
 * TOP_CHART_SHARDS most divergent by TV and by JS, since no chart draws more shards than that.
 */
export const ALL_CHART_SHARDS = 200;
export const TOP_CHART_SHARDS = 40;
