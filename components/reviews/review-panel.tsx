import type { ReviewOverview, WorkspacePerson } from "@/db/queries/reviews";
import { ROLE_LABELS } from "@/lib/auth/roles";
import { formatReportDate } from "@/lib/reports/report-view";
import { DECISION_PAST_TENSE, DECISION_TITLES, latestDecisions } from "@/lib/reviews/review-state";
import { CommentForm } from "./comment-form";
import { CommentThreads } from "./comment-threads";
import { DecisionForm } from "./decision-form";
import type { ReportReviewActions } from "./report-review-actions";
import { RequestReviewForm } from "./request-review-form";
import { ReviewStateChip } from "./review-state-chip";

/**
 * The review of one report version: its state, who was asked and what each decided (with the
 * reasons), the comment threads, and the forms the viewer's role allows.
 */
export function ReviewPanel({
  actions,
  report,
  overview,
  candidates,
  viewerId,
  can,
}: {
  actions: ReportReviewActions;
  /** shardIds: every shard's id, or null when there are too many to pick from a list. */
  report: { id: string; version: number; shardIds: string[] | null };
  overview: ReviewOverview;
  candidates: WorkspacePerson[];
  viewerId: string;
  can: { request: boolean; comment: boolean; decide: boolean };
}) {
  const latest = latestDecisions(overview.decisions);
  const alreadyAsked = new Set(overview.requests.map((request) => request.reviewerId));
  const askable = candidates
    .filter((person) => person.userId !== viewerId && !alreadyAsked.has(person.userId))
    .map((person) => ({
      userId: person.userId,
      label: person.name ?? person.email,
      detail: `${ROLE_LABELS[person.role].toLowerCase()}, ${person.email}`,
    }));
  return (
    <section
      id="review"
      aria-labelledby="review-heading"
      className="space-y-6 rounded-lg border border-ink/10 bg-paper-deep/40 p-6 print:break-before-page"
    >
      <div className="flex flex-wrap items-center gap-3">
        <h2 id="review-heading" className="text-xl font-semibold text-ink">
          Review of version {report.version}
        </h2>
        <ReviewStateChip state={overview.state} />
      </div>
      <p className="max-w-prose text-sm text-ink-soft">
        Decisions apply to this version only; a new version of the report starts not referred.
      </p>

      {overview.requests.length > 0 ? (
        <div className="space-y-2">
          <h3 className="font-semibold">Reviewers</h3>
          <ul className="space-y-1 text-sm" aria-label="Reviewers referred to">
            {overview.requests.map((request) => {
              const decision = latest.get(request.reviewerId);
              return (
                <li key={request.reviewerId}>
                  <span className="font-medium">{request.reviewerName}</span>{" "}
                  <span className="text-ink-soft">
                    — {decision ? DECISION_TITLES[decision] : "still reading"} (referred by{" "}
                    {request.requestedByName})
                  </span>
                  {request.note ? (
                    <blockquote
                      className="mt-1 border-l-2 border-ink/20 pl-3 whitespace-pre-wrap text-ink-soft"
                      aria-label={`Note from ${request.requestedByName}`}
                    >
                      {request.note}
                    </blockquote>
                  ) : null}
                </li>
              );
            })}
          </ul>
        </div>
      ) : null}

      {overview.decisions.length > 0 ? (
        <div className="space-y-2">
          <h3 className="font-semibold">Decisions</h3>
          <ol className="space-y-2" aria-label="Decisions">
            {overview.decisions.map((decision) => (
              <li key={decision.id} className="rounded-md border border-ink/10 bg-white p-3">
                <p className="text-sm">
                  <span className="font-medium">{decision.reviewerName}</span>{" "}
                  {DECISION_PAST_TENSE[decision.decision]} ·{" "}
                  <span className="text-ink-soft">{formatReportDate(decision.createdAt)}</span>
                </p>
                <p className="mt-1 text-sm whitespace-pre-wrap">{decision.reason}</p>
              </li>
            ))}
          </ol>
        </div>
      ) : null}

      <div className="no-print grid gap-6 md:grid-cols-2">
        {can.request ? (
          <RequestReviewForm requestReview={actions.requestReview} candidates={askable} />
        ) : null}
        {can.decide ? (
          <DecisionForm decideReview={actions.decideReview} version={report.version} />
        ) : null}
      </div>

      <div className="space-y-3">
        <h3 className="font-semibold">Comments</h3>
        <CommentThreads
          actions={actions}
          comments={overview.comments}
          canComment={can.comment}
          viewerId={viewerId}
        />
        {can.comment ? (
          <div className="no-print">
            <CommentForm postComment={actions.postComment} shardIds={report.shardIds} />
          </div>
        ) : null}
      </div>
    </section>
  );
}
