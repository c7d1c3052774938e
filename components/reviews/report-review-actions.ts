import type { ActionResult } from "@/lib/actions/result";

/**
 * The report page's review actions (its route's review-actions.ts), bound by the page to its
 * workspace and report and handed down to the forms that use them.
 */
export interface ReportReviewActions {
  requestReview: (input: {
    reviewerIds: string[];
    note?: string;
  }) => Promise<ActionResult<{ asked: number }>>;
  decideReview: (input: {
    decision: string;
    reason: string;
  }) => Promise<ActionResult<{ decisionId: string }>>;
  postComment: (input: {
    body: string;
    parentId?: string;
    anchorKind?: string;
    anchor?: string;
  }) => Promise<ActionResult<{ commentId: string; mentioned: number }>>;
  reviseComment: (input: {
    commentId: string;
    body: string;
  }) => Promise<ActionResult<{ mentioned: number }>>;
  removeComment: (commentId: string) => Promise<ActionResult>;
}
