// Review state rules, written out from issue 5 ("a decision belongs to one report version") and the
// rule chosen in lib/reviews/review-state.ts (a request for changes outweighs approvals).
import { describe, expect, it } from "vitest";
import { describeReviewState, summarizeReviewState } from "@/lib/reviews/review-state";

const at = (minute: number) => new Date(Date.UTC(2026, 0, 1, 9, minute));

describe("summarizeReviewState", () => {
  it("is not reviewed with no requests and no decisions", () => {
    const state = summarizeReviewState({ requestedReviewerIds: [], decisions: [] });
    expect(state).toEqual({ kind: "not-reviewed" });
    expect(describeReviewState(state)).toBe("Not yet reviewed");
  });

  it("counts the requested reviewers who have not decided", () => {
    const state = summarizeReviewState({
      requestedReviewerIds: ["a", "b", "c"],
      decisions: [{ reviewerId: "b", decision: "approve", createdAt: at(1) }],
    });
    expect(state).toEqual({ kind: "awaiting", pending: 2 });
    expect(describeReviewState(state)).toBe("Awaiting 2 reviewers");
    expect(describeReviewState({ kind: "awaiting", pending: 1 })).toBe("Awaiting 1 reviewer");
  });

  it("lets one request for changes outweigh approvals and pending reviewers", () => {
    expect(
      summarizeReviewState({
        requestedReviewerIds: ["a", "b"],
        decisions: [
          { reviewerId: "a", decision: "approve", createdAt: at(1) },
          { reviewerId: "owner", decision: "changes-requested", createdAt: at(2) },
        ],
      }),
    ).toEqual({ kind: "changes-requested" });
  });

  it("uses each reviewer's newest decision, whatever order the rows come in", () => {
    const decisions = [
      { reviewerId: "a", decision: "approve", createdAt: at(5) },
      { reviewerId: "a", decision: "changes-requested", createdAt: at(1) },
    ] as const;
    expect(summarizeReviewState({ requestedReviewerIds: ["a"], decisions })).toEqual({
      kind: "approved",
    });
  });

  it("is approved by an unrequested decider when nobody was asked", () => {
    expect(
      summarizeReviewState({
        requestedReviewerIds: [],
        decisions: [{ reviewerId: "owner", decision: "approve", createdAt: at(1) }],
      }),
    ).toEqual({ kind: "approved" });
  });
});
