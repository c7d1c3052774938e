import type { AnalysisStage } from "@/lib/analysis";
import { STAGE_LABELS } from "@/lib/reports/analysis-status";

const STAGES = Object.keys(STAGE_LABELS) as AnalysisStage[];

type StageState = "done" | "current" | "halted" | "next";

const STATE_LOOK: Record<StageState, { badge: string; label: string; spoken: string }> = {
  done: { badge: "bg-verdigris-soft text-verdigris", label: "text-ink", spoken: "(done)" },
  current: { badge: "bg-indigo-soft text-indigo", label: "font-medium", spoken: "(in progress)" },
  halted: { badge: "bg-cadmium-soft text-cadmium", label: "font-medium", spoken: "" },
  next: { badge: "bg-paper-deep", label: "text-ink-faint", spoken: "(to come)" },
};

function stateOf(index: number, current: number, allDone: boolean, halted: boolean): StageState {
  if (allDone || index < current) return "done";
  if (index > current) return "next";
  return halted ? "halted" : "current";
}

/**
 * The engine's five stages as a checklist: done, current (with its own percentage) or — when the
 * run failed or was cancelled — where it stopped, and those to come.
 */
export function ProgressStages({
  stage,
  fraction,
  allDone,
  halted,
}: {
  stage: AnalysisStage | null;
  fraction: number;
  allDone: boolean;
  halted: boolean;
}) {
  const current = stage === null ? -1 : STAGES.indexOf(stage);
  return (
    <ol className="space-y-1.5 text-sm">
      {STAGES.map((name, index) => {
        const state = stateOf(index, current, allDone, halted);
        const look = STATE_LOOK[state];
        return (
          <li key={name} className="flex items-center gap-2">
            <span
              aria-hidden
              className={`inline-flex h-5 w-5 items-center justify-center rounded-full text-xs ${look.badge}`}
            >
              {state === "done" ? "✓" : state === "halted" ? "■" : index + 1}
            </span>
            <span className={look.label}>{STAGE_LABELS[name]}</span>
            {state === "current" ? (
              <span className="text-ink-soft tabular-nums">{Math.round(fraction * 100)} %</span>
            ) : null}
            {state === "halted" ? <span className="text-ink-soft">stopped here</span> : null}
            <span className="sr-only">{look.spoken}</span>
          </li>
        );
      })}
    </ol>
  );
}
