"use server";

import { revalidatePath } from "next/cache";
import { recordAudit } from "@/db/queries/audit";
import {
  addComment,
  createReviewRequests,
  deleteComment,
  editComment,
  listRequesters,
  listWorkspacePeople,
  recordDecision,
  requireReportInWorkspace,
  type ReportForReview,
} from "@/db/queries/reviews";
import { failWith, succeed, type ActionResult } from "@/lib/actions/result";
import { requireRole } from "@/lib/auth/guards";
import { deliverNotification } from "@/lib/notifications/deliver";
import { linkTo, notificationSettingsPath, reportPath } from "@/lib/notifications/links";
import {
  decisionMadeMessage,
  mentionedMessage,
  reviewRequestedMessage,
} from "@/lib/notifications/messages";
import { findMentionedMembers } from "@/lib/reviews/mentions";
import {
  commentEditSchema,
  commentSchema,
  decisionSchema,
  reviewRequestSchema,
} from "@/lib/reviews/review-input";
import { DECISION_AUDIT_ACTIONS } from "@/lib/reviews/review-state";

function reportRef(report: ReportForReview) {
  return {
    title: report.title,
    version: report.version,
    url: linkTo(reportPath(report.workspaceId, report.id)),
  };
}

const settingsUrl = (workspaceId: string) => linkTo(notificationSettingsPath(workspaceId));

/** An analyst (or owner) refers this version to chosen owners/reviewers; each gets an e-mail. */
export async function requestReview(
  workspaceId: string,
  reportId: string,
  input: { reviewerIds: string[]; note?: string },
): Promise<ActionResult<{ asked: number }>> {
  try {
    const { user, workspace } = await requireRole(workspaceId, "requestReview");
    const values = reviewRequestSchema.parse(input);
    const report = await requireReportInWorkspace(workspace.id, reportId);
    const asked = await createReviewRequests({
      report,
      requestedBy: user.id,
      reviewerIds: values.reviewerIds,
      note: values.note,
    });
    if (asked.length > 0) {
      await recordAudit({
        workspaceId: workspace.id,
        actor: user,
        action: "report.referred",
        targetType: "report",
        targetId: report.id,
        details: {
          title: report.title,
          version: report.version,
          reviewers: asked.map((person) => person.email),
        },
      });
    }
    await Promise.all(
      asked.map((person) =>
        deliverNotification({
          workspaceId: workspace.id,
          recipient: person,
          kind: "referred",
          message: reviewRequestedMessage({
            report: reportRef(report),
            requesterName: user.name ?? user.email,
            workspaceName: workspace.name,
            note: values.note,
            settingsUrl: settingsUrl(workspace.id),
          }),
        }),
      ),
    );
    revalidatePath(reportPath(workspace.id, report.id));
    return succeed({ asked: asked.length });
  } catch (error) {
    return failWith(error, "request-review");
  }
}

/** A comment (or a reply) on this version; members it @mentions get an e-mail. */
export async function postComment(
  workspaceId: string,
  reportId: string,
  input: { body: string; parentId?: string; anchorKind?: string; anchor?: string },
): Promise<ActionResult<{ commentId: string; mentioned: number }>> {
  try {
    const { user, workspace } = await requireRole(workspaceId, "commentOnReport");
    const values = commentSchema.parse(input);
    const report = await requireReportInWorkspace(workspace.id, reportId);
    const mentioned = await findMentionedOthers(workspace.id, values.body, user.id);
    const { id } = await addComment({
      report,
      authorId: user.id,
      body: values.body,
      parentId: values.parentId,
      anchorKind: values.anchorKind,
      anchor: values.anchor,
      mentions: mentioned.map((member) => member.userId),
    });
    await notifyMentioned(mentioned, {
      workspaceId: workspace.id,
      report,
      authorName: user.name ?? user.email,
      body: values.body,
    });
    revalidatePath(reportPath(workspace.id, report.id));
    return succeed({ commentId: id, mentioned: mentioned.length });
  } catch (error) {
    return failWith(error, "post-comment");
  }
}

/**
 * The author rewrites their own comment on this version. Audited with the earlier text; members
 * the new text mentions for the first time get an e-mail.
 */
export async function reviseComment(
  workspaceId: string,
  reportId: string,
  input: { commentId: string; body: string },
): Promise<ActionResult<{ mentioned: number }>> {
  try {
    const { user, workspace } = await requireRole(workspaceId, "commentOnReport");
    const values = commentEditSchema.parse(input);
    const report = await requireReportInWorkspace(workspace.id, reportId);
    const mentioned = await findMentionedOthers(workspace.id, values.body, user.id);
    const { earlierBody, earlierMentions } = await editComment({
      report,
      commentId: values.commentId,
      authorId: user.id,
      body: values.body,
      mentions: mentioned.map((member) => member.userId),
    });
    await recordAudit({
      workspaceId: workspace.id,
      actor: user,
      action: "comment.edited",
      targetType: "comment",
      targetId: values.commentId,
      details: { title: report.title, version: report.version, before: earlierBody },
    });
    const newlyMentioned = mentioned.filter((member) => !earlierMentions.includes(member.userId));
    await notifyMentioned(newlyMentioned, {
      workspaceId: workspace.id,
      report,
      authorName: user.name ?? user.email,
      body: values.body,
    });
    revalidatePath(reportPath(workspace.id, report.id));
    return succeed({ mentioned: newlyMentioned.length });
  } catch (error) {
    return failWith(error, "edit-comment");
  }
}

/** The author deletes their own comment on this version; audited with the text it had. */
export async function removeComment(
  workspaceId: string,
  reportId: string,
  commentId: string,
): Promise<ActionResult> {
  try {
    const { user, workspace } = await requireRole(workspaceId, "commentOnReport");
    const report = await requireReportInWorkspace(workspace.id, reportId);
    const { earlierBody } = await deleteComment({ report, commentId, authorId: user.id });
    await recordAudit({
      workspaceId: workspace.id,
      actor: user,
      action: "comment.deleted",
      targetType: "comment",
      targetId: commentId,
      details: { title: report.title, version: report.version, before: earlierBody },
    });
    revalidatePath(reportPath(workspace.id, report.id));
    return succeed();
  } catch (error) {
    return failWith(error, "delete-comment");
  }
}

/**
 * A reviewer (or owner) endorses this version's layout or returns it for rework, with a reason.
 * Audited, and everyone who referred the report gets an e-mail.
 */
export async function decideReview(
  workspaceId: string,
  reportId: string,
  input: { decision: string; reason: string },
): Promise<ActionResult<{ decisionId: string }>> {
  try {
    const { user, workspace } = await requireRole(workspaceId, "decideReview");
    const values = decisionSchema.parse(input);
    const report = await requireReportInWorkspace(workspace.id, reportId);
    const { id } = await recordDecision({
      report,
      reviewerId: user.id,
      decision: values.decision,
      reason: values.reason,
    });
    await recordAudit({
      workspaceId: workspace.id,
      actor: user,
      action: DECISION_AUDIT_ACTIONS[values.decision],
      targetType: "report",
      targetId: report.id,
      details: {
        title: report.title,
        version: report.version,
        decision: values.decision,
        reason: values.reason,
      },
    });
    const requesters = (await listRequesters(report.id)).filter(
      (person) => person.userId !== user.id,
    );
    await Promise.all(
      requesters.map((person) =>
        deliverNotification({
          workspaceId: workspace.id,
          recipient: person,
          kind: "decision-made",
          message: decisionMadeMessage({
            report: reportRef(report),
            reviewerName: user.name ?? user.email,
            decision: values.decision,
            reason: values.reason,
            settingsUrl: settingsUrl(workspace.id),
          }),
        }),
      ),
    );
    revalidatePath(reportPath(workspace.id, report.id));
    return succeed({ decisionId: id });
  } catch (error) {
    return failWith(error, "decide-review");
  }
}

/** Members a comment's text mentions, leaving out its author. */
async function findMentionedOthers(workspaceId: string, body: string, authorId: string) {
  const members = await listWorkspacePeople(workspaceId);
  return findMentionedMembers(body, members).filter((member) => member.userId !== authorId);
}

/** E-mails each mentioned member (as their preferences allow) that a comment names them. */
async function notifyMentioned(
  members: Awaited<ReturnType<typeof findMentionedOthers>>,
  comment: {
    workspaceId: string;
    report: Parameters<typeof reportRef>[0];
    authorName: string;
    body: string;
  },
): Promise<void> {
  await Promise.all(
    members.map((member) =>
      deliverNotification({
        workspaceId: comment.workspaceId,
        recipient: member,
        kind: "mentioned",
        message: mentionedMessage({
          report: reportRef(comment.report),
          authorName: comment.authorName,
          body: comment.body,
          settingsUrl: settingsUrl(comment.workspaceId),
        }),
      }),
    ),
  );
}
