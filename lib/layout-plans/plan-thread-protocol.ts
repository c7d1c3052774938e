import type {
  AnalysisProgress,
  LayoutFailure,
  LayoutPlanProgress,
  LayoutSpec,
  PartitionSummary,
} from "@/lib/analysis";
import type { AnalysisOptionsInput } from "@/lib/validation/analysis-options";
import type { StoredFile } from "@/lib/reports/hashed-object";

/** What the planner thread is started with (structured-cloned into it). */
export interface PlanThreadInput {
  workspaceId: string;
  dataset: StoredFile;
  options: AnalysisOptionsInput;
  groupColumn: string | null;
  shardCount: number;
  specs: LayoutSpec[];
  seed: number;
  /** Candidates (by index) an earlier run of the job finished: not generated or scored again. */
  finishedIndexes: number[];
}

/** Everything the planner thread tells its parent. */
export type PlanThreadMessage =
  /** The shared reading and encoding. */
  | { type: "plan-progress"; progress: Extract<LayoutPlanProgress, { fraction: number }> }
  | {
      type: "candidate-progress";
      index: number;
      status: "running";
      progress: AnalysisProgress | null;
    }
  /** A candidate scored; its map is already in storage under `mapObjectKey`. */
  | {
      type: "candidate-done";
      index: number;
      summary: PartitionSummary;
      mapObjectKey: string;
      mapSizeBytes: number;
    }
  | { type: "candidate-failed"; index: number; failure: LayoutFailure }
  | { type: "finished" }
  /** Bad input for the plan as a whole: the engine's message, written for the user. */
  | { type: "input-error"; message: string }
  | { type: "storage-unreachable"; detail: string }
  /** Anything else, with its stack, for the server's log only. */
  | { type: "internal-error"; detail: string };
