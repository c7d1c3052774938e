/**
 * Partita's analysis engine (methods.md): pure TypeScript, no framework, no database, shared by the
 * CLI, the web app's background worker and the tests.
 */
export { analyzePartition, type PartitionInput } from "./analyze-partition";
export { AnalysisInputError } from "./errors";
export { countShardsUpTo } from "./count-shards";
export {
  DEFAULT_MEMORY_LIMIT_BYTES,
  readMemorySettings,
  type MemorySettings,
} from "./memory-limit";
export type { Advice, Verdict } from "./advise-plan";
export type {
  AnalysisProgress,
  AnalysisStage,
  DigestProvenance,
  PartitionSummary,
  ShardSummary,
} from "./summary";
export {
  estimateSimulationCost,
  simulatePlan,
  type AlgorithmResult,
  type SimulationProgress,
  type SimulationSummary,
} from "./simulation/simulate-plan";
export { ENGINE_VERSION } from "./version";
export * from "./digests";
export * from "./layouts";
