import type { AnalysisOptionsInput } from "../../validation/analysis-options";
import { analyzeDesign } from "../analyze-design";
import { parseOptions } from "../parse-options";
import type { Design } from "../design";
import { encodeDesign } from "../encode-design";
import { AnalysisInputError, listFirst } from "../errors";
import type { PartitionMap } from "../partition-map";
import { countAvailableThreads, PassPool } from "../pass-pool";
import { readDataset, type RawDataset } from "../read-dataset";
import type { TableSource } from "../table-reader";
import { isMissingToken } from "../tokens";
import type { AnalysisProgress, PartitionSummary } from "../summary";
import {
  defaultLayoutSpecs,
  describeLayoutParameters,
  generateLayout,
  GENERATOR_FACTS,
  nameLayout,
  type LayoutGenerator,
  type LayoutSpec,
} from "./generators";
import type { LayoutRows, ShardAssignment } from "./layout-rows";
import { rankLayouts } from "./rank-layouts";
import { allocateRegroupedRows, regroupDesign } from "./regroup-design";

export interface LayoutPlanInput {
  /** The dataset: CSV, gzip-compressed CSV or Parquet, as a stream or a local file. */
  data: TableSource;
  dataName?: string;
  dataBytes?: number;
  /** The analysis options every candidate is scored with; no shard column (the planner makes them). */
  options: AnalysisOptionsInput;
  /** Rows sharing a value of this column stay in one shard under the group generators. */
  groupColumn?: string;
  /** M, the shards of every candidate. */
  shardCount: number;
  /** Candidates to generate; default `defaultLayoutSpecs`. */
  specs?: LayoutSpec[];
  /** Seed of every generator (default 1). */
  seed?: number;
  /**
   * Candidates (by index in `specs`) finished earlier, by a run that was interrupted: neither
   * generated nor scored, and absent from the result.
   */
  skipIndexes?: ReadonlySet<number>;
  /** Threads for the passes over the rows (default every core, at most 8). */
  threads?: number;
  /** Cancels between candidates (and within a candidate's simulation). */
  signal?: AbortSignal;
  onProgress?: (progress: LayoutPlanProgress) => void;
  /**
   * Each candidate as soon as it is scored or has failed, awaited before the next one starts (a
   * background run stores it, so a cancelled plan keeps the candidates it finished).
   */
  onCandidate?: (outcome: LayoutCandidateOutcome) => Promise<void>;
}

/** One candidate's outcome: scored (with its map's rows) or failed. */
export type LayoutCandidateOutcome =
  | { index: number; candidate: LayoutCandidate; rowIds: string[]; assignment: ShardAssignment }
  | { index: number; failure: LayoutFailure };

export type LayoutPlanProgress =
  | { stage: "reading" | "encoding"; fraction: number }
  | {
      stage: "candidate";
      name: string;
      index: number;
      count: number;
      status: "running" | "done" | "failed";
      analysis?: AnalysisProgress;
    };

/** One scored candidate (methods.md §8's comparison keys). */
export interface LayoutCandidate {
  name: string;
  generator: LayoutGenerator;
  parameters: Record<string, number>;
  seed: number;
  shards: number;
  summary: PartitionSummary;
}

/** A candidate that could not be generated or scored; the others go on. */
export interface LayoutFailure {
  name: string;
  generator: LayoutGenerator;
  parameters: Record<string, number>;
  seed: number;
  message: string;
  /** True when the input (data, M, parameters) is the reason, not a defect. */
  badInput: boolean;
}

export interface LayoutComparison {
  /** Ranked by ρ (lower favours local updates), then by weighted JS. */
  layouts: LayoutCandidate[];
  failures: LayoutFailure[];
  shardCount: number;
  groupColumn: string | null;
}

export interface LayoutPlanResult {
  comparison: LayoutComparison;
  /** Row id of every kept row in file order: the id column's value, or the 0-based data row index. */
  rowIds: string[];
  /** Each candidate's shard per kept row (same order as rowIds), by name. */
  assignments: Map<string, ShardAssignment>;
}

/** Seed of the generators when none is given (as the simulation's). */
export const DEFAULT_LAYOUT_SEED = 1;

/**
 * The layout planner (methods.md §8): reads and encodes the dataset once, then per candidate
 * generates a partition of the kept rows into M shards, regroups the encoded rows and runs the full
 * analysis under the same options and plan. Input errors of the plan as a whole throw
 * AnalysisInputError; a candidate that fails is recorded and the others go on.
 */
export async function planLayouts(input: LayoutPlanInput): Promise<LayoutPlanResult> {
  const options = parseOptions(input.options);
  const specs = input.specs ?? defaultLayoutSpecs(input.groupColumn !== undefined);
  const seed = input.seed ?? DEFAULT_LAYOUT_SEED;
  checkPlan(input, options.shardColumn, specs, seed);
  const onProgress = input.onProgress ?? (() => {});

  const pool = new PassPool(input.threads ?? countAvailableThreads());
  try {
    onProgress({ stage: "reading", fraction: 0 });
    const { raw, rowIds, groups, groupIds } = await readWholeDataset(input, options);
    onProgress({ stage: "reading", fraction: 1 });
    onProgress({ stage: "encoding", fraction: 0 });
    const design = encodeDesign(raw, options.task, {
      badNumbersAsMissing: options.badNumbersAsMissing,
    });
    onProgress({ stage: "encoding", fraction: 1 });
    const rows: LayoutRows = {
      classes: design.skewCategories,
      classCount: design.skewCategoryCount,
      features: design.x,
      groups,
      groupIds,
    };
    checkShardCount(input.shardCount, rowIds.length, groupIds.length, specs);

    // Every candidate's rows in the same memory, one candidate after another.
    const regrouped = allocateRegroupedRows(design);
    const layouts: LayoutCandidate[] = [];
    const failures: LayoutFailure[] = [];
    const assignments = new Map<string, ShardAssignment>();
    for (const [index, spec] of specs.entries()) {
      input.signal?.throwIfAborted();
      if (input.skipIndexes?.has(index)) continue;
      const name = nameLayout(spec);
      const record = {
        name,
        generator: spec.generator,
        parameters: describeLayoutParameters(spec),
        seed,
      };
      const report = (status: "running" | "done" | "failed", analysis?: AnalysisProgress) =>
        onProgress({ stage: "candidate", name, index, count: specs.length, status, analysis });
      report("running");
      let scored: { candidate: LayoutCandidate; assignment: ShardAssignment } | undefined;
      try {
        const assignment = generateLayout(spec, rows, input.shardCount, seed, (points) =>
          pool.shareKMeansRows(points),
        );
        const summary = await scoreLayout(
          regroupDesign(design, assignment, input.shardCount, regrouped),
          raw,
          input,
          options,
          pool,
          report,
        );
        scored = { candidate: { ...record, shards: summary.shards.length, summary }, assignment };
      } catch (error) {
        if (input.signal?.aborted) throw error;
        const badInput = error instanceof AnalysisInputError;
        const failure = { ...record, message: (error as Error).message, badInput };
        failures.push(failure);
        await input.onCandidate?.({ index, failure });
        report("failed");
        continue;
      }
      // Outside the candidate's try: a failure to store a scored candidate (storage down) is the
      // plan's failure, not this candidate's.
      assignments.set(name, scored.assignment);
      layouts.push(scored.candidate);
      await input.onCandidate?.({ index, ...scored, rowIds });
      report("done");
    }
    return {
      comparison: {
        layouts: rankLayouts(layouts),
        failures,
        shardCount: input.shardCount,
        groupColumn: input.groupColumn ?? null,
      },
      rowIds,
      assignments,
    };
  } finally {
    await pool.close();
  }
}

function scoreLayout(
  design: Design,
  { totalRows, format }: Pick<RawDataset, "totalRows" | "format">,
  input: LayoutPlanInput,
  options: ReturnType<typeof parseOptions>,
  pool: PassPool,
  report: (status: "running", analysis: AnalysisProgress) => void,
): Promise<PartitionSummary> {
  return analyzeDesign(
    design,
    options,
    {
      pool,
      totalRows,
      format,
      partitionName: input.dataName ?? "dataset",
      threads: input.threads,
      signal: input.signal,
    },
    (analysis) => report("running", analysis),
  );
}

function checkPlan(
  input: LayoutPlanInput,
  shardColumn: string | undefined,
  specs: LayoutSpec[],
  seed: number,
): void {
  if (shardColumn !== undefined) {
    throw new AnalysisInputError("the layout planner makes the shards: no shard column", {
      column: shardColumn,
      expected: "a dataset without a shard column option",
    });
  }
  if (!Number.isInteger(input.shardCount) || input.shardCount < 2) {
    throw new AnalysisInputError(`the number of shards is ${input.shardCount}`, {
      expected: "a whole number of shards, at least 2",
    });
  }
  if (!Number.isInteger(seed) || seed < 0 || seed >= 2 ** 32) {
    throw new AnalysisInputError(`the seed is ${seed}`, {
      expected: "a whole number from 0 to 4294967295",
    });
  }
  if (specs.length === 0) {
    throw new AnalysisInputError("no layout generators were given", {
      expected: "at least one generator",
    });
  }
  const names = specs.map(nameLayout);
  const twice = names.find((name, index) => names.indexOf(name) !== index);
  if (twice !== undefined) {
    throw new AnalysisInputError(`the layout "${twice}" is asked for twice`, {
      expected: "each generator and parameter once",
    });
  }
  const needsGroups = specs.find((spec) => GENERATOR_FACTS[spec.generator].usesGroups);
  if (needsGroups && input.groupColumn === undefined) {
    throw new AnalysisInputError(`the ${needsGroups.generator} layout needs a group column`, {
      expected: "a group column (rows of one user, device or site stay together)",
    });
  }
  const { labelColumn, idColumn } = input.options;
  if (input.groupColumn !== undefined && [labelColumn, idColumn].includes(input.groupColumn)) {
    throw new AnalysisInputError("the group column cannot also be the label or id column", {
      column: input.groupColumn,
      expected: "a column of group values (user, device, site)",
    });
  }
}

function checkShardCount(
  shardCount: number,
  rowCount: number,
  groupCount: number,
  specs: LayoutSpec[],
): void {
  if (shardCount > rowCount) {
    throw new AnalysisInputError(`${shardCount} shards for ${rowCount} kept rows`, {
      expected: "at most as many shards as rows",
    });
  }
  if (specs.some((spec) => GENERATOR_FACTS[spec.generator].usesGroups) && shardCount > groupCount) {
    throw new AnalysisInputError(`${shardCount} shards for ${groupCount} groups`, {
      expected: "at most as many shards as groups (groups stay whole)",
    });
  }
}

interface WholeDataset {
  raw: RawDataset;
  rowIds: string[];
  groups: Int32Array | null;
  groupIds: string[];
}

/** Reads every kept row into one shard, keeping each row's id and group for the generators. */
async function readWholeDataset(
  input: LayoutPlanInput,
  options: ReturnType<typeof parseOptions>,
): Promise<WholeDataset> {
  const dataName = input.dataName ?? "dataset";
  const rowIds: string[] = [];
  const groupCodes: number[] = [];
  const groupIds: string[] = [];
  const groupCodeOf = new Map<string, number>();
  const missingGroupRows: number[] = [];
  let missingGroups = 0;
  const columns = [
    ...(options.idColumn ? [{ name: options.idColumn, role: "id" }] : []),
    ...(input.groupColumn ? [{ name: input.groupColumn, role: "group" }] : []),
  ];
  const raw = await readDataset(input.data, dataName, options, {
    partition: wholeDatasetPartition(dataName),
    dropUnassignedRows: false,
    format: {
      encoding: options.encoding,
      delimiter: options.delimiter,
      decimalMark: options.decimalMark,
    },
    onBytesRead: input.dataBytes
      ? (bytes) =>
          input.onProgress?.({
            stage: "reading",
            fraction: Math.min(1, bytes / (input.dataBytes as number)),
          })
      : undefined,
    keptRowText: {
      columns,
      onRow(values, rowIndex) {
        rowIds.push(options.idColumn ? values[0] : String(rowIndex));
        if (!input.groupColumn) return;
        const group = values[values.length - 1];
        if (isMissingToken(group)) {
          missingGroups++;
          if (missingGroupRows.length < 5) missingGroupRows.push(rowIndex);
        }
        let code = groupCodeOf.get(group);
        if (code === undefined) {
          code = groupIds.length;
          groupIds.push(group);
          groupCodeOf.set(group, code);
        }
        groupCodes.push(code);
      },
    },
  });
  if (missingGroups > 0) {
    throw new AnalysisInputError(
      `${missingGroups} kept rows have no group (rows ${listFirst(missingGroupRows, missingGroups)})`,
      {
        file: dataName,
        column: input.groupColumn,
        expected: "a group value on every labelled row",
      },
    );
  }
  return {
    raw,
    rowIds,
    groups: input.groupColumn ? Int32Array.from(groupCodes) : null,
    groupIds,
  };
}

/**
 * Every row in one shard: the planner reads the dataset before any layout exists. Like a partition
 * map it reports an id seen on a second row (-2), so duplicate ids fail as they would on read-back.
 */
function wholeDatasetPartition(fileName: string): PartitionMap {
  const seen = new Set<string>();
  return {
    fileName,
    shardIds: ["all rows"],
    lookUp(rowId) {
      if (seen.has(rowId)) return -2;
      seen.add(rowId);
      return 0;
    },
    findUnmatched: () => [],
  };
}
