/**
 * Partita's analysis engine (methods.md): pure TypeScript, no framework, no database, shared by the
 * CLI, the web app's background worker and the tests. This is the server's entry: everything of
 * the browser-safe entry (browser.ts) and the parts that read files and run threads.
 */
export * from "./browser";
export { analyzePartition, type PartitionInput } from "./analyze-partition";
export { countShardsUpTo } from "./count-shards";
export {
  DEFAULT_MEMORY_LIMIT_BYTES,
  readMemorySettings,
  type MemorySettings,
} from "./memory-limit";
export { simulatePlan } from "./simulation/simulate-plan";
export * from "./digests";
export * from "./layouts";
