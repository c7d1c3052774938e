import type { AnalysisStatusView } from "@/db/queries/analyses";
import type { AnalysisStage, SimulationProgress } from "@/lib/analysis";

/** What GET /api/workspaces/[workspaceId]/analyses/[analysisId] answers. */
export interface AnalysisStatusJson {
  status: AnalysisStatusView["status"];
  /** The engine's stage: always set while running; null while queued. */
  stage: AnalysisStage | null;
  /** Progress within `stage`, 0 to 1. */
  fraction: number;
  /** Written for the user: the engine's message about the input, or a plain internal-error note. */
  failureMessage: string | null;
  attempts: number;
  /** Whether the analysis simulates the plan (methods.md §7) after the engine's stages. */
  simulates: boolean;
  /** The simulation's latest run and round; null before it starts and without one. */
  simulation: SimulationProgress | null;
  reportId: string | null;
  title: string;
  /** When a sweeper found this analysis's worker gone (the run was handed back and restarted). */
  workerLostAt: string | null;
  /** Since when the current run has been waiting for storage to answer again. */
  storageUnreachableSince: string | null;
  /** ISO 8601 times. */
  createdAt: string;
  startedAt: string | null;
  finishedAt: string | null;
}

export function toStatusJson(view: AnalysisStatusView): AnalysisStatusJson {
  return {
    status: view.status,
    // Only the worker writes the stage, and only the engine's stage names. A running analysis
    // whose worker has not reported yet is reading its input: callers never see a running null.
    stage: (view.stage as AnalysisStage | null) ?? (view.status === "running" ? "reading" : null),
    fraction: view.fraction,
    failureMessage: view.failureMessage,
    attempts: view.attempts,
    simulates: view.simulates,
    simulation: view.simulationProgress,
    reportId: view.reportId,
    title: view.title,
    workerLostAt: view.workerLostAt?.toISOString() ?? null,
    storageUnreachableSince: view.storageUnreachableSince?.toISOString() ?? null,
    createdAt: view.createdAt.toISOString(),
    startedAt: view.startedAt?.toISOString() ?? null,
    finishedAt: view.finishedAt?.toISOString() ?? null,
  };
}

/**
 * What the progress page says about trouble the run met and is riding out: storage that stopped
 * answering, or a worker that died (whose run another worker took up). Null when there is none.
 * `formatTime` renders a time in the reader's locale.
 */
export function interruptionNotice(
  status: Pick<
    AnalysisStatusJson,
    "status" | "workerLostAt" | "storageUnreachableSince" | "startedAt"
  >,
  formatTime: (iso: string) => string,
): string | null {
  if (status.status !== "running") return null;
  if (status.storageUnreachableSince) {
    return `Storage unreachable since ${formatTime(status.storageUnreachableSince)}, retrying… The analysis goes on by itself once storage answers again.`;
  }
  if (status.workerLostAt && status.startedAt && status.startedAt > status.workerLostAt) {
    return `The worker running this analysis stopped (noticed at ${formatTime(status.workerLostAt)}); another run of it restarted at ${formatTime(status.startedAt)}.`;
  }
  return null;
}

/** The engine's stages in order, as the progress page names them. */
export const STAGE_LABELS: Record<AnalysisStage, string> = {
  reading: "Reading the dataset and partition map",
  encoding: "Encoding the features",
  fitting: "Fitting the reference model",
  measuring: "Measuring how the shards differ",
  advising: "Weighing local updates against minibatches",
};

/** The simulation (methods.md §7) as the progress page names it, after the engine's stages. */
export const SIMULATION_STAGE_LABEL = "Simulating the plan on your shards";

/**
 * Each stage's share of the progress bar, close to its share of the time on the 100 000-row
 * benchmark (`npm run bench`: fitting ≈ 75 %), so the bar moves at a roughly steady pace instead
 * of racing through the quick stages and stalling on the fit.
 */
const STAGE_SHARES: Record<AnalysisStage, number> = {
  reading: 0.12,
  encoding: 0.08,
  fitting: 0.68,
  measuring: 0.1,
  advising: 0.02,
};

const STAGES = Object.keys(STAGE_LABELS) as AnalysisStage[];

/**
 * The simulation's share of the progress bar when there is one. Its runs (3 × (8 + S), a few more
 * when a step-size grid is extended) take most of
 * the time: on the benchmark's 100 000 rows even R = 10 made it about 30 of 37 s of CPU time (the
 * engine alone: 6.4 s, README), and R = 100 ten times as much.
 */
const SIMULATION_SHARE = 0.8;

const clampFraction = (value: number) => Math.min(1, Math.max(0, value));

/** Progress from 0 to 1 through the engine's stages, from the current stage and its fraction. */
function engineFraction(stage: AnalysisStage | null, fraction: number): number {
  if (stage === null) return 0;
  const before = STAGES.slice(0, STAGES.indexOf(stage)).reduce(
    (sum, earlier) => sum + STAGE_SHARES[earlier],
    0,
  );
  return Math.min(1, before + STAGE_SHARES[stage] * clampFraction(fraction));
}

/** Overall progress from 0 to 1: the engine's stages, then the simulation when there is one. */
export function overallProgress(
  status: Pick<AnalysisStatusJson, "status" | "stage" | "fraction" | "simulates" | "simulation">,
): number {
  if (status.status === "succeeded") return 1;
  const engine = engineFraction(status.stage, status.fraction);
  if (!status.simulates) return engine;
  const simulation = status.simulation ? clampFraction(status.simulation.fraction) : 0;
  return (1 - SIMULATION_SHARE) * engine + SIMULATION_SHARE * simulation;
}

export function isFinished(status: AnalysisStatusJson["status"]): boolean {
  return status === "succeeded" || status === "failed" || status === "cancelled";
}
