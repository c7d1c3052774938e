// Review state rules, written out from issue 5 ("a decision belongs to one report version") and the
// rule chosen in lib/reviews/review-state.ts (a return for rework outweighs endorsements).
import { describe, expect, it } from "vitest";
import { describeReviewState, summarizeReviewState } from "@/lib/reviews/review-state";

const at = (minute: number) => new Date(Date.UTC(2026, 0, 1, 9, minute));

describe("summarizeReviewState", () => {
  it("is not referred with no referrals and no decisions", () => {
    const state = summarizeReviewState({ requestedReviewerIds: [], decisions: [] });
    expect(state).toEqual({ kind: "not-referred" });
    expect(describeReviewState(state)).toBe("Not referred");
  });

  it("counts the requested reviewers who have not decided", () => {
    const state = summarizeReviewState({
      requestedReviewerIds: ["a", "b", "c"],
      decisions: [{ reviewerId: "b", decision: "endorse", createdAt: at(1) }],
    });
    expect(state).toEqual({ kind: "with-reviewers", pending: 2 });
    expect(describeReviewState(state)).toBe("With 2 reviewers");
    expect(describeReviewState({ kind: "with-reviewers", pending: 1 })).toBe("With 1 reviewer");
  });

  it("lets one return outweigh endorsements and pending reviewers", () => {
    expect(
      summarizeReviewState({
        requestedReviewerIds: ["a", "b"],
        decisions: [
          { reviewerId: "a", decision: "endorse", createdAt: at(1) },
          { reviewerId: "owner", decision: "return", createdAt: at(2) },
        ],
      }),
    ).toEqual({ kind: "returned" });
  });

  it("uses each reviewer's newest decision, whatever order the rows come in", () => {
    const decisions = [
      { reviewerId: "a", decision: "endorse", createdAt: at(5) },
      { reviewerId: "a", decision: "return", createdAt: at(1) },
    ] as const;
    expect(summarizeReviewState({ requestedReviewerIds: ["a"], decisions })).toEqual({
      kind: "endorsed",
    });
  });

  it("is endorsed by an unreferred decider when nobody was asked", () => {
    expect(
      summarizeReviewState({
        requestedReviewerIds: [],
        decisions: [{ reviewerId: "owner", decision: "endorse", createdAt: at(1) }],
      }),
    ).toEqual({ kind: "endorsed" });
  });
});
