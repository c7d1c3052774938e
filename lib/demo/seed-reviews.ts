import "server-only";
import { and, count, desc, eq, inArray } from "drizzle-orm";
import { db } from "@/db/client";
import { memberships, reports, reportShards, reviewRequests, users } from "@/db/schema";
import { recordAudit } from "@/db/queries/audit";
import {
  addComment,
  createReviewRequests,
  recordDecision,
  reportForReviewColumns,
} from "@/db/queries/reviews";
import { DEMO_ACCOUNTS } from "./seed";
import { DEMO_REPORT_TITLES } from "./seed-analyses";

const POLL_MS = 2_000;

type DemoPerson = { id: string; email: string; workspaceId: string };

async function findDemoPerson(email: string): Promise<DemoPerson | undefined> {
  const [person] = await db()
    .select({ id: users.id, email: users.email, workspaceId: memberships.workspaceId })
    .from(users)
    .innerJoin(memberships, eq(memberships.userId, users.id))
    .where(eq(users.email, email));
  return person;
}

/** The demo reports once the worker has stored both, or undefined if they are not there yet. */
async function findDemoReports(workspaceId: string) {
  const rows = await db()
    .select(reportForReviewColumns)
    .from(reports)
    .where(
      and(
        eq(reports.workspaceId, workspaceId),
        inArray(reports.title, Object.values(DEMO_REPORT_TITLES)),
      ),
    );
  const byOrchard = rows.find((row) => row.title === DEMO_REPORT_TITLES.byOrchard);
  const shuffled = rows.find((row) => row.title === DEMO_REPORT_TITLES.shuffled);
  return byOrchard && shuffled ? { byOrchard, shuffled } : undefined;
}

/**
 * Gives the demo a review in each state a reviewer meets: the by-orchard report is with the demo
 * reviewer, with a comment pinned to its most skewed orchard; the shuffled one is endorsed. Waits
 * (up to `waitMs`) for the worker to store the two demo reports, since the seed only queues them.
 * Runs once: a demo workspace that has any review request is left alone. Writes the audit entries
 * the product would; sends no e-mail (the demo people have no mailboxes). Returns whether it seeded.
 */
export async function seedDemoReviews(waitMs: number): Promise<boolean> {
  const [, analystAccount, reviewerAccount] = DEMO_ACCOUNTS;
  const [analyst, reviewer] = await Promise.all([
    findDemoPerson(analystAccount.email),
    findDemoPerson(reviewerAccount.email),
  ]);
  if (!analyst || !reviewer) return false;
  const workspaceId = analyst.workspaceId;
  const [{ requests }] = await db()
    .select({ requests: count() })
    .from(reviewRequests)
    .where(eq(reviewRequests.workspaceId, workspaceId));
  if (requests > 0) return false;

  const deadline = Date.now() + waitMs;
  let demoReports = await findDemoReports(workspaceId);
  while (!demoReports && Date.now() < deadline) {
    await new Promise((resolve) => setTimeout(resolve, POLL_MS));
    demoReports = await findDemoReports(workspaceId);
  }
  if (!demoReports) return false;
  const { byOrchard, shuffled } = demoReports;

  for (const [report, note] of [
    [byOrchard, "The orchards disagree a lot. Does the large-minibatch advice hold for our plan?"],
    [shuffled, "Shuffled layout for comparison; I expect local updates to be fine here."],
  ] as const) {
    await createReviewRequests({
      report,
      requestedBy: analyst.id,
      reviewerIds: [reviewer.id],
      note,
    });
    await recordAudit({
      workspaceId,
      actor: analyst,
      action: "report.referred",
      targetType: "report",
      targetId: report.id,
      details: { title: report.title, version: report.version, reviewers: [reviewer.email] },
    });
  }

  const [mostSkewed] = await db()
    .select({ shardId: reportShards.shardId })
    .from(reportShards)
    .where(eq(reportShards.reportId, byOrchard.id))
    .orderBy(desc(reportShards.js))
    .limit(1);
  await addComment({
    report: byOrchard,
    authorId: reviewer.id,
    anchorKind: "shard",
    anchor: mostSkewed.shardId,
    body: "This orchard's label mix is the furthest from the pool. Would moving half its rows to other shards change the verdict?",
    mentions: [],
  });

  const reason = "Near-IID shards and a long plan: local updates are the sensible choice here.";
  await recordDecision({ report: shuffled, reviewerId: reviewer.id, decision: "endorse", reason });
  await recordAudit({
    workspaceId,
    actor: reviewer,
    action: "report.endorsed",
    targetType: "report",
    targetId: shuffled.id,
    details: { title: shuffled.title, version: shuffled.version, decision: "endorse", reason },
  });
  return true;
}
