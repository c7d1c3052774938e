/**
 * The review's own vocabulary, in one place. A report version is *referred* to reviewers, who read
 * it and either *endorse* the layout (the verdict and its evidence hold for the plan) or *return* it
 * for rework, always with a reason.
 */
import type { AuditAction, REVIEW_DECISION_KINDS } from "@/db/schema/reviews";

export type ReviewDecisionKind = (typeof REVIEW_DECISION_KINDS)[number];

/** How a decision reads after a name: "Ada endorsed the layout". */
export const DECISION_PAST_TENSE: Record<ReviewDecisionKind, string> = {
  endorse: "endorsed the layout",
  return: "returned it for rework",
};

/** The title case heading of a decision, also the start of its e-mail subject. */
export const DECISION_TITLES: Record<ReviewDecisionKind, string> = {
  endorse: "Endorsed",
  return: "Returned for rework",
};

/** The audit log names a decision by what it did to the report. */
export const DECISION_AUDIT_ACTIONS: Record<ReviewDecisionKind, AuditAction> = {
  endorse: "report.endorsed",
  return: "report.returned",
};

export type ReviewState =
  | { kind: "not-referred" }
  | { kind: "with-reviewers"; pending: number }
  | { kind: "endorsed" }
  | { kind: "returned" };

export interface ReviewStateInput {
  /** Reviewers this version was referred to. */
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
 * The state of one report version. A return from anyone outweighs endorsements (someone found a
 * problem); otherwise the version stays with its reviewers until every one of them has decided.
 * Decisions belong to one version, so a new version starts "not referred".
 */
export function summarizeReviewState(input: ReviewStateInput): ReviewState {
  const latest = latestDecisions(input.decisions);
  if ([...latest.values()].includes("return")) return { kind: "returned" };
  const pending = input.requestedReviewerIds.filter((id) => !latest.has(id)).length;
  if (pending > 0) return { kind: "with-reviewers", pending };
  return latest.size > 0 ? { kind: "endorsed" } : { kind: "not-referred" };
}

export function describeReviewState(state: ReviewState): string {
  switch (state.kind) {
    case "not-referred":
      return "Not referred";
    case "with-reviewers":
      return `With ${state.pending} reviewer${state.pending === 1 ? "" : "s"}`;
    case "endorsed":
      return DECISION_TITLES.endorse;
    case "returned":
      return DECISION_TITLES.return;
  }
}
