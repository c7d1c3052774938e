import type { PartitionSummary } from "../summary";

/** What ranking reads of a candidate: its summary's advice and label skew. */
type RankedLayout = { summary: Pick<PartitionSummary, "advice" | "labelSkew"> };

/**
 * Ranks by ρ = local / minibatch bound (null last), then by weighted JS (methods.md §8). A module
 * of its own so the web's comparison ranks stored candidates without loading the planner.
 */
export function rankLayouts<Layout extends RankedLayout>(layouts: Layout[]): Layout[] {
  const ratio = (layout: Layout) => layout.summary.advice.ratio ?? Infinity;
  return [...layouts].sort(
    (a, b) => ratio(a) - ratio(b) || a.summary.labelSkew.js - b.summary.labelSkew.js,
  );
}
