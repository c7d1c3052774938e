import type { DatasetColumnChoice, InputProblemLocation, MemorySettings, SchemaDigest, Task } from "@/lib/analysis";
import type { StoredFile } from "./hashed-object";

/** What an analysis part's thread is started with (structured-cloned into it). */
export interface PartThreadInput {
  /** The part's name in messages ("part 2 of 3"). */
  name: string;
  dataset: StoredFile;
  /** The file's header bytes and the part's byte range [start, end). */
  range: { headerBytes: number; start: number; end: number };
  columns: DatasetColumnChoice;
  task?: Task;
  /** Threads of the part's passes (default: the cores this process may use). */
  threads?: number;
  /** The worker's memory limit and scratch folder. */
  memory: Pick<MemorySettings, "limitBytes" | "scratchDirectory">;
}

/** A question of the coordinator, as stored with the part's exchange. */
export type PartQuestionKind = "evaluate" | "gram" | "gradients";

/** What the parent sends the thread. */
export type PartThreadRequest =
  | { type: "ask"; id: number; kind: PartQuestionKind; question: unknown }
  /** Give back the scratch files and the pass threads, then say "closed". */
  | { type: "close" };

/** Everything the part's thread tells its parent. */
export type PartThreadMessage =
  /** Round 1: the part is read and its schema digest computed. */
  | { type: "read"; schema: SchemaDigest }
  /** Rows went to a scratch file past the memory limit (sent once). */
  | { type: "spilled" }
  | { type: "answer"; id: number; answer: unknown }
  /** Bad input: the engine's problem and where, to rebuild its message in the parent. */
  | { type: "input-error"; problem: string; location: InputProblemLocation }
  /** Anything else, with its stack, for the server's log only. */
  | { type: "internal-error"; detail: string }
  | { type: "closed" };
