import { tmpdir } from "node:os";
import { parseMemorySize } from "./memory-size";
import { GRAM_CHUNK_ROWS } from "./pass-jobs";

/** Peak memory an analysis aims to stay under by default: 2 GiB for the whole process. */
export const DEFAULT_MEMORY_LIMIT_BYTES = 2 * 2 ** 30;

/**
 * Share of the limit the encoded rows may take in memory. The rest is for what grows with the rows
 * besides them (labels, shard codes and their orderings: about 40 bytes a row), the blocks read from
 * a scratch file, the runtime and the pass threads.
 */
const DESIGN_SHARE = 0.4;
/** A block read from or written to a scratch file takes about this share of the limit … */
const BLOCK_SHARE = 1 / 32;
/** … within these bounds (small blocks waste system calls, large ones memory). */
const MIN_BLOCK_BYTES = 2 ** 20;
const MAX_BLOCK_BYTES = 64 * 2 ** 20;

/** How much memory an analysis may use, and where rows go beyond it. */
export interface MemorySettings {
  /** Peak memory the process aims to stay under, in bytes. */
  limitBytes: number;
  /** Folder for scratch files (their names never stay in it: see scratch-file.ts). */
  scratchDirectory: string;
  /** Called when the rows move to a scratch file (progress reports and tests). */
  onScratchFile?: (path: string) => void;
}

/** The settings with defaults filled in: the default limit and the system's temporary folder. */
export function resolveMemorySettings(given: Partial<MemorySettings> = {}): MemorySettings {
  return {
    limitBytes: given.limitBytes ?? DEFAULT_MEMORY_LIMIT_BYTES,
    scratchDirectory: given.scratchDirectory ?? tmpdir(),
    onScratchFile: given.onScratchFile,
  };
}

/** Bytes the encoded rows (or the values read, before encoding) may take in memory. */
export function measureRowBudget(settings: MemorySettings): number {
  return Math.floor(settings.limitBytes * DESIGN_SHARE);
}

/** The smallest memory limit under which rows of this many bytes stay in memory. */
export function measureLimitForRows(bytes: number): number {
  return Math.ceil(bytes / DESIGN_SHARE);
}

/**
 * Rows per block when rows of `width` numbers live in a scratch file: a multiple of the Gram task's
 * rows (16 384), so that blocks cut the passes exactly where the in-memory tasks are cut and the
 * results are the same bit for bit; at least one such task.
 */
export function chooseBlockRows(settings: MemorySettings, width: number): number {
  const bytes = Math.min(
    MAX_BLOCK_BYTES,
    Math.max(MIN_BLOCK_BYTES, settings.limitBytes * BLOCK_SHARE),
  );
  const rows = Math.floor(bytes / (width * Float64Array.BYTES_PER_ELEMENT));
  return Math.max(1, Math.floor(rows / GRAM_CHUNK_ROWS)) * GRAM_CHUNK_ROWS;
}

/**
 * The memory settings a process takes from its environment: PARTITA_MEMORY_LIMIT (a size as
 * `parseMemorySize` reads it) and PARTITA_SCRATCH_DIR; a flag given on the command line wins.
 */
export function readMemorySettings(
  environment: Partial<Record<string, string>>,
  flags: { memoryLimit?: string; scratchDirectory?: string } = {},
): MemorySettings {
  const limit = flags.memoryLimit ?? environment.PARTITA_MEMORY_LIMIT;
  return resolveMemorySettings({
    limitBytes:
      limit === undefined || limit === ""
        ? undefined
        : parseMemorySize(
            limit,
            flags.memoryLimit === undefined ? "PARTITA_MEMORY_LIMIT" : "--memory-limit",
          ),
    scratchDirectory: flags.scratchDirectory ?? (environment.PARTITA_SCRATCH_DIR || undefined),
  });
}
