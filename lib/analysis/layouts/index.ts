/** The layout planner of methods.md §8: candidate splits of one dataset, scored and compared. */
export {
  defaultLayoutSpecs,
  describeLayoutParameters,
  GENERATOR_FACTS,
  LAYOUT_GENERATORS,
  nameLayout,
  parseLayoutSpec,
  type LayoutGenerator,
  type LayoutSpec,
} from "./generators";
export { writeLayoutMap } from "./layout-map";
export { rankLayouts } from "./rank-layouts";
export {
  DEFAULT_LAYOUT_SEED,
  planLayouts,
  type LayoutCandidate,
  type LayoutCandidateOutcome,
  type LayoutComparison,
  type LayoutFailure,
  type LayoutPlanInput,
  type LayoutPlanProgress,
  type LayoutPlanResult,
} from "./plan-layouts";
