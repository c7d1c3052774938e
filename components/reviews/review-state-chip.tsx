import { describeReviewState, type ReviewState } from "@/lib/reviews/review-state";

// A square-cornered tag with a thick rule down its left edge, like a note pinned in a report's
// margin: deliberately not the round pill the report's verdict uses, so the two never read alike.
const TONES: Record<ReviewState["kind"], string> = {
  "not-referred": "border-ink/25 bg-paper-deep text-ink-soft",
  "with-reviewers": "border-ink/60 bg-white text-ink",
  endorsed: "border-ink bg-ink/90 text-paper",
  returned: "border-cadmium bg-cadmium-soft text-ink",
};

// Reading marks: a dotted line still to read, an ellipsis while reviewers read, a solid diamond for
// an endorsed layout, a turning arrow for one sent back to be reworked.
const MARKS: Record<ReviewState["kind"], string> = {
  "not-referred": "┄",
  "with-reviewers": "…",
  endorsed: "◆",
  returned: "↺",
};

/** A version's review state as a tag; the words carry the meaning, mark and colour repeat it. */
export function ReviewStateChip({ state }: { state: ReviewState }) {
  return (
    <span
      data-testid="review-state"
      className={`inline-flex items-center gap-1.5 rounded-[2px] border-l-4 px-2 py-0.5 text-xs font-semibold tracking-wide whitespace-nowrap ${TONES[state.kind]}`}
    >
      <span aria-hidden="true">{MARKS[state.kind]}</span>
      {describeReviewState(state)}
    </span>
  );
}
