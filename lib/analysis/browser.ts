/**
 * The engine's browser-safe entry: constants, rules, pure functions and types that neither read
 * files nor start threads, so client components, pages and shared view code import the engine
 * through this one door without pulling node:fs, node:stream or worker threads into a bundle. The
 * server's entry (index.ts) re-exports all of it beside the reading and threaded parts.
 */
export {
  ADVICE_CAVEATS,
  computeBounds,
  decideVerdict,
  LOCAL_STEP_CHOICES,
  ROUND_CHOICES,
  type Advice,
  type BoundInputs,
  type Bounds,
  type Verdict,
} from "./advise-plan";
export { MAX_AGREEMENT_SHARDS } from "./assemble-summary";
export { compareCodePoints } from "./code-point-order";
export { MAX_ONE_HOT_LEVELS } from "./column-accumulator";
export { AnalysisInputError, type InputProblemLocation } from "./errors";
export { parseMemorySize } from "./memory-size";
export { PATH_POINTS } from "./path-points";
export { quoteValue, showValue } from "./quote-value";
export { MAX_CLASSES_FOR_NUMERIC_LABEL } from "./task-rules";
export { isMissingToken, parseNumberToken, trimToken } from "./tokens";
export * from "./text-format";
export { ENGINE_VERSION } from "./version";
export type {
  AnalysisProgress,
  AnalysisStage,
  DigestProvenance,
  PartitionSummary,
  ShardSummary,
} from "./summary";
export type { AlgorithmName, TrainingPlan } from "./simulation/run-algorithm";
// Types only (erased from a bundle): the shapes the threaded parts answer with.
export type {
  AlgorithmResult,
  SimulationProgress,
  SimulationSummary,
} from "./simulation/simulate-plan";
export type { LayoutCandidate, LayoutComparison } from "./layouts/plan-layouts";
export {
  countOf,
  estimateEvaluationCost,
  estimateSimulationCost,
  fitWithinBudget,
} from "./simulation/simulation-cost";
export {
  describeLayoutParameters,
  GENERATOR_FACTS,
  nameLayout,
  type LayoutGenerator,
  type LayoutSpec,
} from "./layouts/generators";
export { rankLayouts } from "./layouts/rank-layouts";
export { parseDigest } from "./digests/parse-digest";
