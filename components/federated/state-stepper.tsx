import { STEPS, type FederatedState } from "./federated-states";

type StepLook = "done" | "current" | "halted" | "next";

const LOOK: Record<StepLook, { badge: string; title: string; spoken: string }> = {
  done: { badge: "bg-verdigris-soft text-verdigris", title: "text-ink", spoken: "(done)" },
  current: { badge: "bg-indigo-soft text-indigo", title: "font-medium", spoken: "(now)" },
  halted: { badge: "bg-cadmium-soft text-cadmium", title: "font-medium", spoken: "(stopped)" },
  next: { badge: "bg-paper-deep", title: "text-ink-faint", spoken: "(to come)" },
};

/**
 * Where a federated analysis stands, as four steps: round 1, encoding and fit, round 2, report.
 * A failed analysis shows the step it stopped in (the last it reached: `failedAt`).
 */
export function StateStepper({
  state,
  failedAt,
}: {
  state: string;
  /** For a failed analysis, the furthest state its clients reached. */
  failedAt?: FederatedState;
}) {
  const shown = (state === "failed" ? (failedAt ?? "collecting-schemas") : state) as FederatedState;
  const current = STEPS.findIndex((step) => step.states.includes(shown));
  return (
    <ol className="grid gap-2 sm:grid-cols-4" aria-label="Progress of the federated analysis">
      {STEPS.map((step, index) => {
        const look: StepLook =
          state === "done" || index < current
            ? "done"
            : index > current
              ? "next"
              : state === "failed"
                ? "halted"
                : "current";
        return (
          <li
            key={step.title}
            className="flex items-start gap-2 rounded-md border border-ink/10 bg-white p-3"
            aria-current={look === "current" ? "step" : undefined}
          >
            <span
              aria-hidden
              className={`inline-flex h-6 w-6 shrink-0 items-center justify-center rounded-full text-xs ${LOOK[look].badge}`}
            >
              {look === "done" ? "✓" : look === "halted" ? "■" : index + 1}
            </span>
            <span className="min-w-0">
              <span className={`block text-sm ${LOOK[look].title}`}>
                {step.title} <span className="sr-only">{LOOK[look].spoken}</span>
              </span>
              <span className="block text-xs text-ink-soft">{step.detail}</span>
            </span>
          </li>
        );
      })}
    </ol>
  );
}
