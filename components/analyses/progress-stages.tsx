import type { AnalysisStage } from "@/lib/analysis";
import { SIMULATION_STAGE_LABEL, STAGE_LABELS } from "@/lib/reports/analysis-status";

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
 * The engine's five stages, and the simulation when there is one, as a checklist: done, current
 * (with its own percentage) or — when the run failed or was cancelled — where it stopped, and those
 * to come.
 */
export function ProgressStages({
  stage,
  fraction,
  simulationFraction,
  allDone,
  halted,
}: {
  stage: AnalysisStage | null;
  fraction: number;
  /** The simulation's progress once it runs, null before; undefined without a simulation. */
  simulationFraction?: number | null;
  allDone: boolean;
  halted: boolean;
}) {
  const steps: { key: string; label: string; fraction: number }[] = STAGES.map((name) => ({
    key: name,
    label: STAGE_LABELS[name],
    fraction,
  }));
  if (simulationFraction !== undefined) {
    steps.push({
      key: "simulating",
      label: SIMULATION_STAGE_LABEL,
      fraction: simulationFraction ?? 0,
    });
  }
  const current =
    typeof simulationFraction === "number"
      ? STAGES.length
      : stage === null
        ? -1
        : STAGES.indexOf(stage);
  return (
    <ol className="space-y-1.5 text-sm">
      {steps.map(({ key, label, fraction: stepFraction }, index) => {
        const state = stateOf(index, current, allDone, halted);
        const look = STATE_LOOK[state];
        return (
          <li key={key} className="flex items-center gap-2">
            <span
              aria-hidden
              className={`inline-flex h-5 w-5 items-center justify-center rounded-full text-xs ${look.badge}`}
            >
              {state === "done" ? "✓" : state === "halted" ? "■" : index + 1}
            </span>
            <span className={look.label}>{label}</span>
            {state === "current" ? (
              <span className="text-ink-soft tabular-nums">{Math.round(stepFraction * 100)} %</span>
            ) : null}
            {state === "halted" ? <span className="text-ink-soft">stopped here</span> : null}
            <span className="sr-only">{look.spoken}</span>
          </li>
        );
      })}
    </ol>
  );
}
