export type ReviewDecisionKind = "approve" | "changes-requested";

export type ReviewState =
  | { kind: "not-reviewed" }
  | { kind: "awaiting"; pending: number }
  | { kind: "approved" }
  | { kind: "changes-requested" };

export interface ReviewStateInput {
  /** Reviewers asked to review this version. */
  requestedReviewerIds: readonly string[];
  /** Every decision on this version, in any order. */
  decisions: readonly { reviewerId: string; decision: ReviewDecisionKind; createdAt: Date }[];
}

/** Each reviewer's newest decision: a reviewer who decides again replaces their earlier word. */
export function latestDecisions(
  decisions: ReviewStateInput["decisions"],
): Map<string, ReviewDecisionKind> {
  const ordered = [...decisions].sort((a, b) => a.createdAt.getTime() - b.createdAt.getTime());
  return new Map(ordered.map((entry) => [entry.reviewerId, entry.decision]));
}

/**
 * The state of one report version. A request for changes from anyone outweighs approvals (someone
 * found a problem); otherwise the version waits until every requested reviewer has decided.
 * Decisions belong to one version, so a new version starts "not reviewed".
 */
export function summarizeReviewState(input: ReviewStateInput): ReviewState {
  const latest = latestDecisions(input.decisions);
  if ([...latest.values()].includes("changes-requested")) return { kind: "changes-requested" };
  const pending = input.requestedReviewerIds.filter((id) => !latest.has(id)).length;
  if (pending > 0) return { kind: "awaiting", pending };
  return latest.size > 0 ? { kind: "approved" } : { kind: "not-reviewed" };
}

export function describeReviewState(state: ReviewState): string {
  switch (state.kind) {
    case "not-reviewed":
      return "Not yet reviewed";
    case "awaiting":
      return `Awaiting ${state.pending} reviewer${state.pending === 1 ? "" : "s"}`;
    case "approved":
      return "Approved";
    case "changes-requested":
      return "Changes requested";
  }
}
