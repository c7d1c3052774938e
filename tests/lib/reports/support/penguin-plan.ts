import type { BoundInputs } from "@/lib/analysis/advise-plan";

/**
 * Bound inputs of the size the engine reports for penguins by island (vega-datasets) under the
 * default plan, rounded: realistic magnitudes for the facts of methods.md §5 that report figures
 * must show (no value is taken from the engine's own functions).
 */
export const PENGUIN_PLAN: BoundInputs = {
  smoothness: 1.9,
  distance: 5.7,
  sigma2: 0.009,
  zeta2Max: 0.77,
  participants: 3,
  localSteps: 10,
  rounds: 100,
  batchSize: 32,
};
