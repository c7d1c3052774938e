import "server-only";
import { and, asc, eq, inArray, isNull, sql } from "drizzle-orm";
import { db } from "@/db/client";
import {
  memberships,
  reports,
  reportShards,
  reviewComments,
  reviewDecisions,
  reviewRequests,
  users,
} from "@/db/schema";
import { AccessError } from "@/lib/auth/errors";
import type { Role } from "@/lib/auth/roles";
import { RuleError } from "@/lib/errors";
import { isReportSection } from "@/lib/reviews/anchors";
import {
  summarizeReviewState,
  type ReviewDecisionKind,
  type ReviewState,
} from "@/lib/reviews/review-state";

const personName = sql<string>`coalesce(${users.name}, ${users.email})`;

/** Roles that can be asked to review: those who may decide. */
const REVIEWING_ROLES: Role[] = ["owner", "reviewer"];

export type WorkspacePerson = { userId: string; name: string | null; email: string; role: Role };

export async function listWorkspacePeople(workspaceId: string): Promise<WorkspacePerson[]> {
  return db()
    .select({ userId: users.id, name: users.name, email: users.email, role: memberships.role })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.workspaceId, workspaceId))
    .orderBy(asc(users.email));
}

/** Members who may be asked to review (owners and reviewers). */
export async function listReviewerCandidates(workspaceId: string): Promise<WorkspacePerson[]> {
  const people = await listWorkspacePeople(workspaceId);
  return people.filter((person) => REVIEWING_ROLES.includes(person.role));
}

/** What the review queries need of a report version; select these to get a ReportForReview. */
export const reportForReviewColumns = {
  id: reports.id,
  workspaceId: reports.workspaceId,
  title: reports.title,
  version: reports.version,
  authorId: reports.authorId,
};

export type ReportForReview = {
  id: string;
  workspaceId: string;
  title: string;
  version: number;
  authorId: string;
};

/** The report version inside this workspace, or a 404 RuleError: ids never cross workspaces. */
export async function requireReportInWorkspace(
  workspaceId: string,
  reportId: string,
): Promise<ReportForReview> {
  const [report] = await db()
    .select(reportForReviewColumns)
    .from(reports)
    .where(and(eq(reports.workspaceId, workspaceId), eq(reports.id, reportId)));
  if (!report) throw new RuleError(404, "That report does not exist in this workspace.");
  return report;
}

/**
 * Asks these members to review the version. Every one must be an owner or reviewer of the
 * workspace; people already asked are skipped. Returns the people newly asked.
 */
export async function createReviewRequests(input: {
  report: ReportForReview;
  requestedBy: string;
  reviewerIds: string[];
  note?: string;
}): Promise<WorkspacePerson[]> {
  const candidates = await listReviewerCandidates(input.report.workspaceId);
  const chosen = [...new Set(input.reviewerIds)].map((id) =>
    candidates.find((candidate) => candidate.userId === id),
  );
  if (chosen.some((person) => person === undefined)) {
    throw new RuleError(
      422,
      "Reviewers must be owners or reviewers of this workspace.",
      "reviewerIds",
    );
  }
  const people = chosen as WorkspacePerson[];
  if (people.some((person) => person.userId === input.requestedBy)) {
    throw new RuleError(422, "Ask someone other than yourself to review.", "reviewerIds");
  }
  const inserted = await db()
    .insert(reviewRequests)
    .values(
      people.map((person) => ({
        workspaceId: input.report.workspaceId,
        reportId: input.report.id,
        reviewerId: person.userId,
        requestedBy: input.requestedBy,
        note: input.note || null,
      })),
    )
    .onConflictDoNothing()
    .returning({ reviewerId: reviewRequests.reviewerId });
  const newlyAsked = new Set(inserted.map((row) => row.reviewerId));
  return people.filter((person) => newlyAsked.has(person.userId));
}

export async function addComment(input: {
  report: ReportForReview;
  authorId: string;
  body: string;
  parentId?: string;
  anchorKind?: "section" | "shard";
  anchor?: string;
  mentions: string[];
}): Promise<{ id: string }> {
  const { report } = input;
  let anchorKind = input.anchorKind ?? null;
  let anchor = input.anchor ?? null;
  if (input.parentId) {
    // A reply joins its thread: same version, and it inherits the thread's pin.
    const [parent] = await db()
      .select({ parentId: reviewComments.parentId })
      .from(reviewComments)
      .where(and(eq(reviewComments.id, input.parentId), eq(reviewComments.reportId, report.id)));
    if (!parent) throw new RuleError(404, "The comment you replied to no longer exists.");
    if (parent.parentId) throw new RuleError(422, "Reply to the first comment of a thread.");
    anchorKind = null;
    anchor = null;
  } else if (anchorKind === "section" && anchor && !isReportSection(anchor)) {
    throw new RuleError(422, `"${anchor}" is not a section of the report.`, "anchor");
  } else if (anchorKind === "shard" && anchor) {
    const [shard] = await db()
      .select({ shardId: reportShards.shardId })
      .from(reportShards)
      .where(and(eq(reportShards.reportId, report.id), eq(reportShards.shardId, anchor)));
    if (!shard) throw new RuleError(422, `This report has no shard "${anchor}".`, "anchor");
  }
  const [row] = await db()
    .insert(reviewComments)
    .values({
      workspaceId: report.workspaceId,
      reportId: report.id,
      parentId: input.parentId ?? null,
      anchorKind,
      anchor,
      body: input.body,
      authorId: input.authorId,
      mentions: input.mentions,
    })
    .returning({ id: reviewComments.id });
  return row;
}

/**
 * The author's own, undeleted comment on this version, or a refusal: 404 when it is gone (or never
 * was on this version), 403 when someone else wrote it.
 */
async function findOwnComment(input: {
  report: ReportForReview;
  commentId: string;
  authorId: string;
}): Promise<{ body: string; mentions: string[] }> {
  const [comment] = await db()
    .select({
      authorId: reviewComments.authorId,
      body: reviewComments.body,
      mentions: reviewComments.mentions,
    })
    .from(reviewComments)
    .where(
      and(
        eq(reviewComments.id, input.commentId),
        eq(reviewComments.workspaceId, input.report.workspaceId),
        eq(reviewComments.reportId, input.report.id),
        isNull(reviewComments.deletedAt),
      ),
    );
  if (!comment) throw new RuleError(404, "That comment no longer exists.");
  if (comment.authorId !== input.authorId) {
    throw new AccessError(403, "Only a comment's author may edit or delete it.");
  }
  return comment;
}

/**
 * The author rewrites their comment: new body and mentions, marked as edited. Returns the earlier
 * text, for the audit log, and the members it already mentioned, so only newly mentioned ones are
 * told.
 */
export async function editComment(input: {
  report: ReportForReview;
  commentId: string;
  authorId: string;
  body: string;
  mentions: string[];
}): Promise<{ earlierBody: string; earlierMentions: string[] }> {
  const { body: earlierBody, mentions: earlierMentions } = await findOwnComment(input);
  await db()
    .update(reviewComments)
    .set({ body: input.body, mentions: input.mentions, editedAt: sql`now()` })
    .where(eq(reviewComments.id, input.commentId));
  return { earlierBody, earlierMentions };
}

/**
 * The author deletes their comment. The row stays with its body emptied, so the replies under a
 * thread's first comment keep their thread; who deleted it, and what it said, is the audit log's
 * to keep (the text is returned for it).
 */
export async function deleteComment(input: {
  report: ReportForReview;
  commentId: string;
  authorId: string;
}): Promise<{ earlierBody: string }> {
  const { body: earlierBody } = await findOwnComment(input);
  await db()
    .update(reviewComments)
    .set({ body: "", mentions: [], deletedAt: sql`now()` })
    .where(eq(reviewComments.id, input.commentId));
  return { earlierBody };
}

export async function recordDecision(input: {
  report: ReportForReview;
  reviewerId: string;
  decision: ReviewDecisionKind;
  reason: string;
}): Promise<{ id: string }> {
  const [row] = await db()
    .insert(reviewDecisions)
    .values({
      workspaceId: input.report.workspaceId,
      reportId: input.report.id,
      reviewerId: input.reviewerId,
      decision: input.decision,
      reason: input.reason,
    })
    .returning({ id: reviewDecisions.id });
  return row;
}

/** Everyone who asked for a review of this version: they hear about decisions. */
export async function listRequesters(reportId: string): Promise<WorkspacePerson[]> {
  return db()
    .selectDistinct({
      userId: users.id,
      name: users.name,
      email: users.email,
      role: memberships.role,
    })
    .from(reviewRequests)
    .innerJoin(users, eq(users.id, reviewRequests.requestedBy))
    .innerJoin(
      memberships,
      and(
        eq(memberships.userId, reviewRequests.requestedBy),
        eq(memberships.workspaceId, reviewRequests.workspaceId),
      ),
    )
    .where(eq(reviewRequests.reportId, reportId));
}

export type ReviewComment = {
  id: string;
  parentId: string | null;
  anchorKind: "section" | "shard" | null;
  anchor: string | null;
  /** Empty once deleted. */
  body: string;
  authorId: string;
  authorName: string;
  createdAt: Date;
  editedAt: Date | null;
  deletedAt: Date | null;
};

export type ReviewOverview = {
  state: ReviewState;
  requests: {
    reviewerId: string;
    reviewerName: string;
    requestedByName: string;
    /** What the referrer wrote to the reviewers, shown on the page as well as in the e-mail. */
    note: string | null;
    at: Date;
  }[];
  decisions: {
    id: string;
    reviewerId: string;
    reviewerName: string;
    decision: ReviewDecisionKind;
    reason: string;
    createdAt: Date;
  }[];
  comments: ReviewComment[];
};

/** Requests, decisions (oldest first), comments and the state of one version of the workspace. */
export async function findReviewOverview(
  workspaceId: string,
  reportId: string,
): Promise<ReviewOverview> {
  const requester = sql<string>`(
    select coalesce(asker.name, asker.email) from ${users} as asker
    where asker.id = ${reviewRequests.requestedBy}
  )`;
  const [requests, decisions, comments] = await Promise.all([
    db()
      .select({
        reviewerId: reviewRequests.reviewerId,
        reviewerName: personName,
        requestedByName: requester,
        note: reviewRequests.note,
        at: reviewRequests.createdAt,
      })
      .from(reviewRequests)
      .innerJoin(users, eq(users.id, reviewRequests.reviewerId))
      .where(
        and(eq(reviewRequests.workspaceId, workspaceId), eq(reviewRequests.reportId, reportId)),
      )
      .orderBy(asc(reviewRequests.createdAt)),
    db()
      .select({
        id: reviewDecisions.id,
        reviewerId: reviewDecisions.reviewerId,
        reviewerName: personName,
        decision: reviewDecisions.decision,
        reason: reviewDecisions.reason,
        createdAt: reviewDecisions.createdAt,
      })
      .from(reviewDecisions)
      .innerJoin(users, eq(users.id, reviewDecisions.reviewerId))
      .where(
        and(eq(reviewDecisions.workspaceId, workspaceId), eq(reviewDecisions.reportId, reportId)),
      )
      .orderBy(asc(reviewDecisions.createdAt)),
    db()
      .select({
        id: reviewComments.id,
        parentId: reviewComments.parentId,
        anchorKind: reviewComments.anchorKind,
        anchor: reviewComments.anchor,
        body: reviewComments.body,
        authorId: reviewComments.authorId,
        authorName: personName,
        createdAt: reviewComments.createdAt,
        editedAt: reviewComments.editedAt,
        deletedAt: reviewComments.deletedAt,
      })
      .from(reviewComments)
      .innerJoin(users, eq(users.id, reviewComments.authorId))
      .where(
        and(eq(reviewComments.workspaceId, workspaceId), eq(reviewComments.reportId, reportId)),
      )
      .orderBy(asc(reviewComments.createdAt)),
  ]);
  const state = summarizeReviewState({
    requestedReviewerIds: requests.map((request) => request.reviewerId),
    decisions,
  });
  return { state, requests, decisions, comments };
}

/** The review state of each listed version, for the reports list (one query per table). */
export async function findReviewStates(
  workspaceId: string,
  reportIds: string[],
): Promise<Map<string, ReviewState>> {
  if (reportIds.length === 0) return new Map();
  const [requests, decisions] = await Promise.all([
    db()
      .select({ reportId: reviewRequests.reportId, reviewerId: reviewRequests.reviewerId })
      .from(reviewRequests)
      .where(
        and(
          eq(reviewRequests.workspaceId, workspaceId),
          inArray(reviewRequests.reportId, reportIds),
        ),
      ),
    db()
      .select({
        reportId: reviewDecisions.reportId,
        reviewerId: reviewDecisions.reviewerId,
        decision: reviewDecisions.decision,
        createdAt: reviewDecisions.createdAt,
      })
      .from(reviewDecisions)
      .where(
        and(
          eq(reviewDecisions.workspaceId, workspaceId),
          inArray(reviewDecisions.reportId, reportIds),
        ),
      ),
  ]);
  return new Map(
    reportIds.map((reportId) => [
      reportId,
      summarizeReviewState({
        requestedReviewerIds: requests
          .filter((request) => request.reportId === reportId)
          .map((request) => request.reviewerId),
        decisions: decisions.filter((decision) => decision.reportId === reportId),
      }),
    ]),
  );
}
