import { describeReviewState, type ReviewState } from "@/lib/reviews/review-state";

const TONES: Record<ReviewState["kind"], string> = {
  "not-reviewed": "bg-paper-deep text-ink-soft ring-ink/15",
  awaiting: "bg-white text-ink ring-ink/30",
  approved: "bg-ink text-paper ring-ink",
  "changes-requested": "bg-cadmium-soft text-cadmium ring-cadmium/40",
};

const MARKS: Record<ReviewState["kind"], string> = {
  "not-reviewed": "○",
  awaiting: "◔",
  approved: "✓",
  "changes-requested": "!",
};

/** A version's review state as a chip; the words carry the meaning, mark and colour repeat it. */
export function ReviewStateChip({ state }: { state: ReviewState }) {
  return (
    <span
      data-testid="review-state"
      className={`inline-flex items-center gap-1 rounded-full px-2.5 py-0.5 text-xs font-semibold whitespace-nowrap ring-1 ${TONES[state.kind]}`}
    >
      <span aria-hidden="true">{MARKS[state.kind]}</span>
      {describeReviewState(state)}
    </span>
  );
}
