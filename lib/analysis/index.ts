/**
 * Partita's analysis engine (methods.md): pure TypeScript, no framework, no database, shared by the
 * CLI, the web app's background worker and the tests. This is the server's entry: everything of
 * the browser-safe entry (browser.ts) and the parts that read files and run threads.
 */
export * from "./browser";
export { analyzePartition, type PartitionInput } from "./analyze-partition";
export { countShardsUpTo } from "./count-shards";
export { countAvailableThreads } from "./pass-pool";
// What the upload previews read of a file's head, without reading the dataset.
export { DECIMAL_MARK_SAMPLE_ROWS, detectDecimalMark, readHeader } from "./csv-reader";
export { describeNonText } from "./decode-text";
export { readParquetHead, readParquetLayout, type AsyncBuffer } from "./parquet-reader";
export { detectTableFormat } from "./table-reader";
export type { DatasetColumnChoice, RawDataset } from "./read-dataset";
export type { Task } from "./design";
export {
  DEFAULT_MEMORY_LIMIT_BYTES,
  readMemorySettings,
  resolveMemorySettings,
  type MemorySettings,
} from "./memory-limit";
export { simulatePlan } from "./simulation/simulate-plan";
export * from "./digests";
export * from "./layouts";
