import type { AnalysisOptions, AnalysisOptionsInput } from "../validation/analysis-options";
import { analyzeDesign } from "./analyze-design";
import { countThreadsForBytes, countThreadsForDesign } from "./choose-threads";
import { isDesignOnDisk, type EncodedDesign } from "./design";
import { encodeDesign } from "./encode-design";
import { AnalysisInputError } from "./errors";
import { resolveMemorySettings, type MemorySettings } from "./memory-limit";
import { parseOptions } from "./parse-options";
import { readPartitionMap } from "./partition-map";
import { PassPool } from "./pass-pool";
import { readDataset } from "./read-dataset";
import type { SimulationProgress } from "./simulation/simulate-plan";
import type { AnalysisProgress, PartitionSummary } from "./summary";
import type { TableSource } from "./table-reader";

export interface PartitionInput {
  /** The dataset: CSV, gzip CSV or Parquet, as a stream (an S3 object body, …) or a local file. */
  data: TableSource;
  /** Name used for the dataset in messages (a path, an upload's name). */
  dataName?: string;
  /** Size of the dataset in bytes, when known, for reading progress. */
  dataBytes?: number;
  /** The partition map `row_id,shard` (same formats); omit when `options.shardColumn` is set. */
  partition?: TableSource;
  partitionName?: string;
  /** Name of the file the given reference weights came from, for messages. */
  referenceName?: string;
  options: AnalysisOptionsInput;
  /**
   * Threads sharing the passes over the rows, the calling thread included (1: no worker threads).
   * Default: every core (at most 8) when the data is large enough to gain — at least 16 MB by
   * `dataBytes`, or, when the size is unknown, at least 2²⁶ multiply-adds per pass. Also the
   * simulation's thread count when given (by default it chooses by its own cost). The summary is
   * the same bit for bit whatever the number.
   */
  threads?: number;
  /**
   * The memory limit (default 2 GiB for the whole process) and the scratch folder (default the
   * system's temporary folder): encoded rows beyond the limit's share live in a scratch file, read
   * block by block for each pass, with the same summary bit for bit. The simulation needs the rows
   * in memory.
   */
  memory?: Partial<MemorySettings>;
  /** Cancels the simulation (`options.simulate`) between rounds; it then throws the signal's reason. */
  signal?: AbortSignal;
  /** Progress of the simulation by run and round. */
  onSimulationProgress?: (progress: SimulationProgress) => void;
}

/**
 * Runs the whole analysis of methods.md on one dataset and partition: read and validate (§1),
 * encode, fit the reference model (§2), measure heterogeneity, noise and smoothness (§3), label and
 * quantity skew (§4), and advise on the plan (§5). Returns the summary of §6.
 * Throws AnalysisInputError for bad input; anything else is an internal error.
 */
export async function analyzePartition(
  input: PartitionInput,
  onProgress: (progress: AnalysisProgress) => void = () => {},
): Promise<PartitionSummary> {
  const options = parseOptions(input.options);
  if ((input.partition === undefined) === (options.shardColumn === undefined)) {
    throw new AnalysisInputError(
      input.partition
        ? "both a partition map and a shard column were given"
        : "no partition was given",
      { expected: "either a partition map (row_id,shard) or a shard column, not both" },
    );
  }

  // Worker threads take about a second to start: when the number is known (asked for, or by the
  // file's size), they start now and load while the data is read.
  const threadsNow =
    input.threads ?? (input.dataBytes === undefined ? null : countThreadsForBytes(input.dataBytes));
  let pool = threadsNow === null ? null : new PassPool(threadsNow);
  try {
    return await analyzeWithPool(input, options, onProgress, threadsNow ?? 1, (design) => {
      pool ??= new PassPool(countThreadsForDesign(design));
      return pool;
    });
  } finally {
    await pool?.close();
  }
}

async function analyzeWithPool(
  input: PartitionInput,
  options: AnalysisOptions,
  onProgress: (progress: AnalysisProgress) => void,
  readThreads: number,
  openPool: (design: EncodedDesign) => PassPool,
): Promise<PartitionSummary> {
  const dataName = input.dataName ?? "dataset";
  const memory = resolveMemorySettings(input.memory);
  onProgress({ stage: "reading", fraction: 0 });
  const partition = input.partition
    ? await readPartitionMap(input.partition, input.partitionName ?? "partition map", {
        byRowIndex: options.idColumn === undefined,
      })
    : null;
  const raw = await readDataset(input.data, dataName, options, {
    partition,
    dropUnassignedRows: options.dropUnassignedRows,
    threads: readThreads,
    memory,
    format: {
      encoding: options.encoding,
      delimiter: options.delimiter,
      decimalMark: options.decimalMark,
    },
    onBytesRead: input.dataBytes
      ? (bytes) => onProgress({ stage: "reading", fraction: Math.min(1, bytes / input.dataBytes!) })
      : undefined,
  });
  onProgress({ stage: "reading", fraction: 1 });

  onProgress({ stage: "encoding", fraction: 0 });
  const design = encodeDesign(raw, options.task, {
    badNumbersAsMissing: options.badNumbersAsMissing,
    memory,
  });
  try {
    return await analyzeDesign(
      design,
      options,
      {
        pool: openPool(design),
        totalRows: raw.totalRows,
        format: raw.format,
        partitionName: input.partitionName ?? dataName,
        referenceName: input.referenceName,
        threads: input.threads,
        signal: input.signal,
        onSimulationProgress: input.onSimulationProgress,
      },
      onProgress,
    );
  } finally {
    if (isDesignOnDisk(design)) design.x.file.close();
  }
}
