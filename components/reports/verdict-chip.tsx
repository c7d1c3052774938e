import type { Verdict } from "@/lib/analysis/browser";
import { VERDICT_LABELS } from "@/lib/reports/report-view";

export const VERDICT_TONES: Record<Verdict, string> = {
  "local-updates": "bg-verdigris-soft text-verdigris ring-verdigris/30",
  "large-minibatch": "bg-indigo-soft text-indigo ring-indigo/30",
  "no-clear-winner": "bg-paper-deep text-ink-soft ring-ink/15",
};

/** A verdict as a small labelled chip; the text carries the meaning, the colour only repeats it. */
export function VerdictChip({ verdict }: { verdict: Verdict }) {
  return (
    <span
      className={`inline-flex items-center rounded-full px-2.5 py-0.5 text-xs font-semibold whitespace-nowrap ring-1 ${VERDICT_TONES[verdict]}`}
    >
      {VERDICT_LABELS[verdict]}
    </span>
  );
}
