import type { EncodedDesign } from "./design";
import { countWeightRows } from "./objective";
import { countAvailableThreads } from "./pass-pool";

// How many threads share an analysis's passes when the caller does not say: worker threads take
// about a second to start, so they are used only when the data is large enough to gain.

/** Data files from this size on are analysed with worker threads by default. */
const PARALLEL_MIN_BYTES = 16 * 2 ** 20;
/** Without a file size: rows × width × weight rows from which worker threads pay for their start. */
const PARALLEL_MIN_WORK = 2 ** 26;

/** Threads for a data file of this size. */
export function countThreadsForBytes(dataBytes: number): number {
  return dataBytes >= PARALLEL_MIN_BYTES ? countAvailableThreads() : 1;
}

/** Threads for passes of this much work each (rows × width × weight rows). */
export function countThreadsForWork(work: number): number {
  return work >= PARALLEL_MIN_WORK ? countAvailableThreads() : 1;
}

/** Threads for a design read from a stream of unknown size: by the work in one pass. */
export function countThreadsForDesign(design: EncodedDesign): number {
  return countThreadsForWork(design.x.rows * design.x.cols * countWeightRows(design));
}
