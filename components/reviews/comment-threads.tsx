import type { ReviewComment } from "@/db/queries/reviews";
import { describeAnchor } from "@/lib/reviews/anchors";
import { formatReportDate } from "@/lib/reports/report-view";
import { CommentForm } from "./comment-form";
import { OwnComment } from "./own-comment";
import type { ReportReviewActions } from "./report-review-actions";

type Thread = { first: ReviewComment; replies: ReviewComment[] };

/**
 * First comments (oldest first) each with their replies; comments arrive in time order. A deleted
 * reply is left out, and so is a deleted first comment with no replies left to hold together.
 */
function groupThreads(comments: ReviewComment[]): Thread[] {
  const threads = new Map<string, Thread>();
  for (const comment of comments) {
    if (!comment.parentId) threads.set(comment.id, { first: comment, replies: [] });
    else if (!comment.deletedAt) threads.get(comment.parentId)?.replies.push(comment);
  }
  return [...threads.values()].filter(
    (thread) => !thread.first.deletedAt || thread.replies.length > 0,
  );
}

function CommentBody({ comment }: { comment: ReviewComment }) {
  if (comment.deletedAt) {
    return <p className="text-sm text-ink-soft italic">Its author deleted this comment.</p>;
  }
  return (
    <div>
      <p className="text-xs text-ink-soft">
        <span className="font-medium text-ink">{comment.authorName}</span> ·{" "}
        {formatReportDate(comment.createdAt)}
        {comment.editedAt ? (
          <span title={`Edited ${formatReportDate(comment.editedAt)}`}> · edited</span>
        ) : null}
      </p>
      <p className="mt-1 text-sm whitespace-pre-wrap">{comment.body}</p>
    </div>
  );
}

export function CommentThreads({
  actions,
  comments,
  canComment,
  viewerId,
}: {
  actions: Pick<ReportReviewActions, "postComment" | "reviseComment" | "removeComment">;
  comments: ReviewComment[];
  canComment: boolean;
  /** The reader: their own comments get Edit and Delete. */
  viewerId: string;
}) {
  const threads = groupThreads(comments);
  // The reader's own live comments, while they may still comment, can be changed.
  const showComment = (comment: ReviewComment) =>
    canComment && comment.authorId === viewerId && !comment.deletedAt ? (
      <OwnComment actions={actions} commentId={comment.id} body={comment.body}>
        <CommentBody comment={comment} />
      </OwnComment>
    ) : (
      <CommentBody comment={comment} />
    );
  if (threads.length === 0) {
    return <p className="text-sm text-ink-soft">No comments on this version yet.</p>;
  }
  return (
    <ol className="space-y-4" aria-label="Comment threads">
      {threads.map(({ first, replies }) => {
        const pin = describeAnchor(first.anchorKind, first.anchor);
        return (
          <li
            key={first.id}
            className="space-y-3 rounded-md border border-ink/10 bg-white p-4"
            data-testid="comment-thread"
          >
            {pin ? (
              <p className="text-xs font-semibold tracking-wide text-ink-soft uppercase">
                On: {pin}
              </p>
            ) : null}
            {showComment(first)}
            {replies.length > 0 ? (
              <ol className="space-y-3 border-l-2 border-ink/10 pl-4">
                {replies.map((reply) => (
                  <li key={reply.id}>{showComment(reply)}</li>
                ))}
              </ol>
            ) : null}
            {canComment ? (
              <div className="no-print">
                <CommentForm postComment={actions.postComment} parentId={first.id} />
              </div>
            ) : null}
          </li>
        );
      })}
    </ol>
  );
}
