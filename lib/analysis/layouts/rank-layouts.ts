import type { LayoutCandidate } from "./plan-layouts";

/**
 * Ranks by ρ = local / minibatch bound (null last), then by weighted JS (methods.md §8). A module
 * of its own so the web's comparison ranks stored candidates without loading the planner.
 */
export function rankLayouts(layouts: LayoutCandidate[]): LayoutCandidate[] {
  const ratio = (layout: LayoutCandidate) => layout.summary.advice.ratio ?? Infinity;
  return [...layouts].sort(
    (a, b) => ratio(a) - ratio(b) || a.summary.labelSkew.js - b.summary.labelSkew.js,
  );
}
