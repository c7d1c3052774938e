import "server-only";
import type { DataFilePreview } from "@/db/schema/analyses";
import { countOf, estimateEvaluationCost, estimateSimulationCost, fitWithinBudget, MAX_ONE_HOT_LEVELS, type TrainingPlan } from "@/lib/analysis/browser";
import { formatFigure } from "@/lib/reports/report-view";
import { detectTask } from "@/lib/uploads/preview-task";
import type { AnalysisOptions } from "@/lib/validation/analysis-options";

// The simulation's cost (methods.md §7) before the dataset is read: the engine's formula applied to
// what the uploads' previews show. The server checks it before queueing and words it for the form
// as the user types (server-only: the engine's simulation module runs threads, which a browser
// bundle cannot hold). The engine checks the exact cost again once it has encoded the whole dataset.

type PreviewColumn = DataFilePreview["columns"][number];

/**
 * Multiply-adds the simulation does per second on one core, roughly, for the time hint. Measured on
 * this project's 2-core machine: penguins (d + 1 = 8, C = 3, R = 2000), 1.5 × 10⁹ in 15 s of CPU
 * time, about 10⁸ a second; the benchmark's 100 000 × 32 × 10 case (M = 100, K = 10, R = 100,
 * S = 3), 3.5 × 10¹⁰ in 165 s of CPU time (README), about 2 × 10⁸. The slower figure is taken, so
 * the hint errs long; a second free core roughly halves it, a busy machine lengthens it.
 */
export const SIMULATION_MULTIPLY_ADDS_PER_SECOND = 1e8;

/**
 * Multiply-adds a second of the full-data loss passes the simulation adds (estimateEvaluationCost),
 * roughly, on one core: a loss-only pass over the benchmark's 100 000 × 33 × 10 design (3.3 × 10⁷)
 * took about 25 ms here, 1.3 × 10⁹ a second; rounded down so the hint errs long.
 */
export const EVALUATION_MULTIPLY_ADDS_PER_SECOND = 1e9;

export interface SimulationEstimateInput {
  /** The dataset's preview; null when the server has none (then nothing can be estimated). */
  dataset: DataFilePreview | null;
  /** The partition map's preview, when the shards come from one. */
  layout?: DataFilePreview | null;
  options: Pick<
    AnalysisOptions,
    | "labelColumn"
    | "idColumn"
    | "shardColumn"
    | "features"
    | "task"
    | "participants"
    | "localSteps"
    | "rounds"
    | "batchSize"
  >;
  /** S, the seeds the chosen step size is re-run on. */
  seeds: number;
  /** The dataset file's size, from which its row count is estimated for the time hint. */
  datasetBytes?: number;
}

export interface SimulationEstimate {
  /** Estimated multiply-adds: 3 × (8 + S) × R·M·K·b·(d+1)·C. */
  cost: number;
  /** The full-data loss passes on top (estimateEvaluationCost); 0 when the rows are unknown. */
  evaluationCost: number;
  /** d + 1: encoded feature columns and the bias. */
  width: number;
  /** C: classes for classification, 1 for regression. */
  weightRows: number;
  /** The plan it was estimated for, M filled in with the shards seen when the plan uses them all. */
  plan: TrainingPlan;
  /** True when the plan takes every shard each round (M not given). */
  allShards: boolean;
  /** S. */
  seeds: number;
  /** False when a preview stopped before the end of its file, so its counts may be too low. */
  wholeFiles: boolean;
}

const isPositiveWhole = (value: number | undefined): value is number =>
  value !== undefined && Number.isInteger(value) && value >= 1;

/**
 * Encoded columns one feature adds (methods.md §1): one for a numeric column, one per level for a
 * text column with at most 32 levels, none for a wider text column or an empty one. A column with a
 * single value is constant after imputation and dropped.
 */
function countEncodedColumns(column: PreviewColumn): number {
  if (column.type === "empty" || column.distinct < 2) return 0;
  if (column.type === "numeric") return 1;
  return column.distinct <= MAX_ONE_HOT_LEVELS ? column.distinct : 0;
}

/**
 * The dataset's data rows, roughly: all of them when the preview holds the whole file, else the
 * file's size over the preview rows' mean length (values cut for the preview only shorten rows, so
 * this errs high). 0 when the preview has no rows to measure.
 */
export function estimateRowCount(preview: DataFilePreview, fileBytes: number): number {
  if (preview.rows.length === 0) return 0;
  const encoder = new TextEncoder();
  const rowBytes = (row: string[]) =>
    row.reduce((sum, value) => sum + encoder.encode(value).length, 0) + row.length;
  const headerBytes = rowBytes(preview.columns.map((column) => column.name));
  const meanRowBytes =
    preview.rows.reduce((sum, row) => sum + rowBytes(row), 0) / preview.rows.length;
  return Math.max(preview.rows.length, Math.round((fileBytes - headerBytes) / meanRowBytes));
}

/**
 * The simulation's cost from the previews, or null when they do not tell enough (no preview, an
 * unknown label column, no shards seen, or a plan value that is not a whole number ≥ 1).
 *
 * Example: penguins by island with the label Species (3 classes), four measurements and Sex (three
 * levels: FEMALE, MALE, "."), M = 3, K = 10, R = 100, b = 32, S = 3: d + 1 = 8, C = 3, cost
 * 3 × 11 × 100 · 3 · 10 · 32 · 8 · 3 = 7.6032e7.
 */
export function estimateSimulationFromPreviews(
  input: SimulationEstimateInput,
): SimulationEstimate | null {
  const { dataset, options } = input;
  if (!dataset) return null;
  const columns = new Map(dataset.columns.map((column) => [column.name, column]));
  const label = columns.get(options.labelColumn);
  if (!label) return null;

  const reserved = new Set([options.labelColumn, options.idColumn, options.shardColumn]);
  const features =
    options.features ??
    dataset.columns.map((column) => column.name).filter((name) => !reserved.has(name));
  const width =
    1 +
    features.reduce((sum, name) => {
      const column = columns.get(name);
      return sum + (column ? countEncodedColumns(column) : 0);
    }, 0);
  const task = options.task ?? detectTask(label);
  const weightRows = task === "regression" ? 1 : label.distinct;

  const shardSource = options.shardColumn
    ? columns.get(options.shardColumn)
    : input.layout?.columns.find((column) => column.name === "shard");
  const participants = options.participants ?? shardSource?.distinct ?? 0;
  const { localSteps, rounds, batchSize } = options;
  if (![participants, localSteps, rounds, batchSize, input.seeds].every(isPositiveWhole)) {
    return null;
  }
  if (weightRows < 1) return null;

  const plan = { participants, localSteps, rounds, batchSize };
  const rows = input.datasetBytes === undefined ? 0 : estimateRowCount(dataset, input.datasetBytes);
  return {
    cost: estimateSimulationCost(plan, width, weightRows, input.seeds),
    evaluationCost: estimateEvaluationCost(rounds, rows, width, weightRows, input.seeds),
    width,
    weightRows,
    plan,
    allShards: options.participants === undefined,
    seeds: input.seeds,
    wholeFiles:
      !dataset.truncated && (options.shardColumn !== undefined || !input.layout?.truncated),
  };
}

/**
 * The cost and time in words for the form: "3.5×10¹⁰" multiply-adds and "about 6 minutes" — the
 * steps at SIMULATION_MULTIPLY_ADDS_PER_SECOND plus the full-data loss passes at
 * EVALUATION_MULTIPLY_ADDS_PER_SECOND — and whether the cost is above the budget.
 */
export function describeSimulationCost(
  cost: number,
  budget: number,
  evaluationCost = 0,
): { amount: string; time: string; overBudget: boolean } {
  const seconds =
    cost / SIMULATION_MULTIPLY_ADDS_PER_SECOND +
    evaluationCost / EVALUATION_MULTIPLY_ADDS_PER_SECOND;
  return {
    amount: formatFigure(cost, 2),
    time: describeDuration(seconds),
    overBudget: cost > budget,
  };
}

/** A rough duration in plain words: "under a minute", "about 6 minutes", "about 3 hours". */
export function describeDuration(seconds: number): string {
  if (seconds < 60) return "under a minute";
  const minutes = Math.round(seconds / 60);
  if (minutes < 90) return minutes === 1 ? "about a minute" : `about ${minutes} minutes`;
  return `about ${Math.round(minutes / 60)} hours`;
}

/** What the form shows of an estimate: plain data, worded on the server. */
export interface SimulationCostView {
  cost: number;
  /** "3.5×10¹⁰" multiply-adds. */
  amount: string;
  /** "about 6 minutes". */
  time: string;
  /** The rate the time assumes, worded: "1×10⁸". */
  rate: string;
  width: number;
  weightRows: number;
  participants: number;
  wholeFiles: boolean;
  /** The refusal when the cost is above the budget (findSimulationRefusal), else null. */
  refusal: string | null;
}

/**
 * The refusal of an estimate above the budget, in the form's words and number format, saying what
 * on the form would bring it within (fitWithinBudget); null within the budget. The budget itself is
 * the server's, so it is not offered as something to change.
 *
 * Example: 7.6032e11 (penguins by island, all 3 shards, R = 1 000 000, S = 3), budget 1e11 →
 * "The simulation would take about 7.6×10¹¹ multiply-adds, above the server's budget of 1.0×10¹¹.
 * It fits with Rounds (R) at most 131,523."
 */
export function findSimulationRefusal(estimate: SimulationEstimate, budget: number): string | null {
  if (estimate.cost <= budget) return null;
  const fit = fitWithinBudget(estimate.cost, budget, estimate.plan, estimate.seeds);
  const shards = fit.participants === null ? null : countOf(fit.participants, "shard");
  const changes = [
    fit.rounds === null ? null : `Rounds (R) at most ${fit.rounds.toLocaleString("en-US")}`,
    shards === null
      ? null
      : estimate.allShards
        ? `a sample of at most ${shards} per round (M) instead of all shards`
        : `Shards per round (M) at most ${fit.participants}`,
    fit.seeds === null ? null : `Seeds (S) at most ${fit.seeds}`,
  ].filter((change) => change !== null);
  const advice =
    changes.length > 0
      ? `It fits with ${changes.join(", or ")}.`
      : "No one change fits it: lower the rounds, shards per round, local steps and batch size together.";
  return (
    `The simulation would take about ${formatFigure(estimate.cost, 2)} multiply-adds, above the ` +
    `server's budget of ${formatFigure(budget, 2)}. ${advice}`
  );
}

/** The estimate as the form shows it, with the refusal when it is above the budget. */
export function toSimulationCostView(
  estimate: SimulationEstimate,
  budget: number,
): SimulationCostView {
  const { amount, time } = describeSimulationCost(estimate.cost, budget, estimate.evaluationCost);
  return {
    cost: estimate.cost,
    amount,
    time,
    rate: formatFigure(SIMULATION_MULTIPLY_ADDS_PER_SECOND, 1),
    width: estimate.width,
    weightRows: estimate.weightRows,
    participants: estimate.plan.participants,
    wholeFiles: estimate.wholeFiles,
    refusal: findSimulationRefusal(estimate, budget),
  };
}
