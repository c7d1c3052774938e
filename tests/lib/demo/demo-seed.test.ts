// The demo is invented data (product.md): these checks hold the product's promise for the demo at
// first start, not any number's correctness — two finished reports whose verdicts disagree, and a
// review in each state a reviewer meets. They run the seed as `npm start` does, against the
// PostgreSQL, S3 fake and analysis worker that `npm test` starts.
import { eq } from "drizzle-orm";
import { afterAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import { listAuditEntries } from "@/db/queries/audit";
import { findReviewOverview } from "@/db/queries/reviews";
import { DEMO_ACCOUNTS, seedDemo } from "@/lib/demo/seed";
import { DEMO_REPORT_TITLES } from "@/lib/demo/seed-analyses";
import { seedDemoReviews } from "@/lib/demo/seed-reviews";
import { dataFiles, memberships, reports, reportShards, users } from "@/db/schema";

afterAll(closeDb);

const WORKER_WAIT_MS = 4 * 60 * 1000;

describe("the demo seed", () => {
  it(
    "leaves two reports whose verdicts disagree, one with its reviewer and one endorsed, once",
    async () => {
      const databaseUrl = process.env.DATABASE_URL ?? "";
      expect(await seedDemo(databaseUrl)).toHaveLength(DEMO_ACCOUNTS.length);
      expect(await seedDemoReviews(WORKER_WAIT_MS)).toBe(true);

      const [{ workspaceId }] = await db()
        .select({ workspaceId: memberships.workspaceId })
        .from(memberships)
        .innerJoin(users, eq(users.id, memberships.userId))
        .where(eq(users.email, DEMO_ACCOUNTS[0].email));
      const stored = await db()
        .select({ id: reports.id, title: reports.title, verdict: reports.verdict })
        .from(reports)
        .where(eq(reports.workspaceId, workspaceId));
      const byTitle = new Map(stored.map((report) => [report.title, report]));
      const byOrchard = byTitle.get(DEMO_REPORT_TITLES.byOrchard);
      const shuffled = byTitle.get(DEMO_REPORT_TITLES.shuffled);
      expect(stored).toHaveLength(2);
      expect([byOrchard?.verdict, shuffled?.verdict]).toEqual(["large-minibatch", "local-updates"]);

      const orchardReview = await findReviewOverview(workspaceId, byOrchard?.id ?? "");
      expect(orchardReview.state).toEqual({ kind: "with-reviewers", pending: 1 });
      const shards = await db()
        .select({ shardId: reportShards.shardId, js: reportShards.js })
        .from(reportShards)
        .where(eq(reportShards.reportId, byOrchard?.id ?? ""));
      const mostSkewed = shards.reduce((worst, shard) => (shard.js > worst.js ? shard : worst));
      expect(orchardReview.comments).toHaveLength(1);
      expect(orchardReview.comments[0]).toMatchObject({
        anchorKind: "shard",
        anchor: mostSkewed.shardId,
      });
      expect((await findReviewOverview(workspaceId, shuffled?.id ?? "")).state).toEqual({
        kind: "endorsed",
      });
      const actions = (await listAuditEntries(workspaceId)).map((entry) => entry.action).sort();
      expect(actions).toEqual(["report.endorsed", "report.referred", "report.referred"]);

      // A second start changes nothing.
      await seedDemo(databaseUrl);
      expect(await seedDemoReviews(0)).toBe(false);
      const files = await db()
        .select({ id: dataFiles.id })
        .from(dataFiles)
        .where(eq(dataFiles.workspaceId, workspaceId));
      expect(files).toHaveLength(3);
      expect(await listAuditEntries(workspaceId)).toHaveLength(3);
    },
    WORKER_WAIT_MS + 60_000,
  );
});
