import type { ReportInput } from "@/db/schema/analyses";
import type {
  AnalysisProgress,
  MemorySettings,
  PartitionSummary,
  SimulationProgress,
} from "@/lib/analysis";
import type { AnalysisOptionsInput } from "@/lib/validation/analysis-options";
import type { StoredFile } from "./hashed-object";

/** What the engine thread is started with (structured-cloned into it). */
export interface EngineThreadInput {
  dataset: StoredFile;
  layout: StoredFile | null;
  weights: StoredFile | null;
  options: AnalysisOptionsInput;
  /** The worker's memory limit and scratch folder (defaults where not configured). */
  memory: Partial<Pick<MemorySettings, "limitBytes" | "scratchDirectory">>;
}

/** Everything the engine thread tells its parent. */
export type EngineThreadMessage =
  | { type: "progress"; progress: AnalysisProgress }
  /** The simulation's run and round (methods.md §7), at most a few times a second. */
  | { type: "simulation-progress"; progress: SimulationProgress }
  | {
      type: "finished";
      summary: PartitionSummary;
      inputs: ReportInput[];
      /** Seconds per engine stage. */
      stageSeconds: Record<string, number>;
      /** The memory limit under which rows went to a scratch file; null when they fit in memory. */
      spilledAtLimit: number | null;
    }
  /** Bad input: the engine's message, written for the user. */
  | { type: "input-error"; message: string }
  /** Storage did not answer (refused, timed out, 5xx): worth trying again later. */
  | { type: "storage-unreachable"; detail: string }
  /** Anything else, with its stack, for the server's log only. */
  | { type: "internal-error"; detail: string };
