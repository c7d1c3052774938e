import type { Matrix } from "../math/matrix";
import { isStoredMatrix, type StoredMatrix } from "./stored-matrix";

export type Task = "classification" | "regression";

/** A column the encoder left out, and why (reported in the summary). */
export interface OmittedColumn {
  column: string;
  reason: "constant" | "too-many-levels" | "all-missing";
}

/**
 * The encoded dataset of methods.md §1, ready for the model: rows grouped by shard (shards in
 * code-point order of their ids), standardized features with the bias 1 as the last column.
 */
export interface Design {
  /** N × (d + 1); row order is shard by shard, `shardOffsets` delimits them. */
  x: Matrix;
  task: Task;
  /** Class names in code-point order (classification) or null (regression). */
  classes: string[] | null;
  /** Per row, the class index (classification) or null. */
  labels: Int32Array | null;
  /** Per row, the standardized target (regression) or null. */
  targets: Float64Array | null;
  /** Per row, the category used for label skew: the class, or the decile bin for regression. */
  skewCategories: Int32Array;
  skewCategoryCount: number;
  /** Regression: each decile bin's smallest and largest label value, in the label's units. */
  skewCategoryRanges?: [number, number][];
  shardIds: string[];
  /** shardOffsets[m] … shardOffsets[m + 1] are shard m's rows; length M + 1. */
  shardOffsets: Int32Array;
  /** Names of the d encoded features (one-hot columns as "column=level"). */
  featureNames: string[];
  omittedColumns: OmittedColumn[];
  droppedRowsMissingLabel: number;
  droppedRowsUnassigned: number;
  /** Values that were not numbers in mostly numeric columns, counted as missing by the user's choice. */
  badNumbersCountedMissing: { column: string; count: number }[];
  warnings: string[];
}

/**
 * A design whose rows did not fit in the memory limit: the same, with the rows in a scratch file
 * (read block by block for each pass; the caller closes the file).
 */
export interface DesignOnDisk extends Omit<Design, "x"> {
  x: StoredMatrix;
}

/** A design in memory or on disk. */
export type EncodedDesign = Design | DesignOnDisk;

export function isDesignOnDisk(design: EncodedDesign): design is DesignOnDisk {
  return isStoredMatrix(design.x);
}

/** Name of the constant column appended to every row. */
export const BIAS_NAME = "(bias)";
