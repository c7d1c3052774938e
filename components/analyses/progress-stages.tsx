import type { AnalysisStage } from "@/lib/analysis";
import { STAGE_LABELS } from "@/lib/reports/analysis-status";

const STAGES = Object.keys(STAGE_LABELS) as AnalysisStage[];

/** The engine's five stages as a checklist: done, current (with its own percentage), to come. */
export function ProgressStages({
  stage,
  fraction,
  allDone,
}: {
  stage: AnalysisStage | null;
  fraction: number;
  allDone: boolean;
}) {
  const current = stage === null ? -1 : STAGES.indexOf(stage);
  return (
    <ol className="space-y-1.5 text-sm">
      {STAGES.map((name, index) => {
        const state = allDone || index < current ? "done" : index === current ? "current" : "next";
        return (
          <li
            key={name}
            className={`flex items-center gap-2 ${state === "next" ? "text-ink-faint" : "text-ink"}`}
          >
            <span
              aria-hidden
              className={`inline-flex h-5 w-5 items-center justify-center rounded-full text-xs ${
                state === "done"
                  ? "bg-verdigris-soft text-verdigris"
                  : state === "current"
                    ? "bg-indigo-soft text-indigo"
                    : "bg-paper-deep"
              }`}
            >
              {state === "done" ? "✓" : index + 1}
            </span>
            <span className={state === "current" ? "font-medium" : undefined}>
              {STAGE_LABELS[name]}
            </span>
            {state === "current" ? (
              <span className="text-ink-soft tabular-nums">{Math.round(fraction * 100)} %</span>
            ) : null}
            <span className="sr-only">
              {state === "done" ? "(done)" : state === "current" ? "(in progress)" : "(to come)"}
            </span>
          </li>
        );
      })}
    </ol>
  );
}
