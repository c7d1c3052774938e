import type { AnalysisProgress } from "@/lib/analysis";

/** Each analysis stage's share of a candidate's time: the fit and the five measuring passes. */
const CANDIDATE_STAGES: { stage: AnalysisProgress["stage"]; share: number }[] = [
  { stage: "fitting", share: 0.6 },
  { stage: "measuring", share: 0.35 },
  { stage: "advising", share: 0.05 },
];

/**
 * A candidate's share done, from the analysis stage it reports. Reading and encoding are the
 * plan's, shared by every candidate; a candidate fits, measures and advises.
 */
export function candidateFraction(progress: AnalysisProgress | null): number {
  if (progress === null) return 0;
  let done = 0;
  for (const { stage, share } of CANDIDATE_STAGES) {
    if (stage === progress.stage) return done + share * progress.fraction;
    done += share;
  }
  return 0;
}

/** The shared stages before any candidate, as the progress page names them. */
export const PLAN_STAGE_LABELS: Record<string, string> = {
  reading: "Reading the dataset",
  encoding: "Encoding the rows",
};
