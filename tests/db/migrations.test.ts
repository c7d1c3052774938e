// Applies drizzle/ to a database created empty for this test on the test server (DATABASE_URL),
// then asks PostgreSQL's own catalogue which tables exist.
import { randomUUID } from "node:crypto";
import { cpSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import path from "node:path";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { drizzle } from "drizzle-orm/node-postgres";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import { applyMigrations, migrationsFolder } from "@/scripts/services/migrate";

const serverUrl = new URL(process.env.DATABASE_URL ?? "postgres://unset");
const databaseName = `partita_migrations_${randomUUID().replace(/-/g, "").slice(0, 12)}`;
const databaseUrl = Object.assign(new URL(serverUrl), { pathname: `/${databaseName}` }).toString();

async function onServer<T>(work: (client: pg.Client) => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: serverUrl.toString() });
  await client.connect();
  try {
    return await work(client);
  } finally {
    await client.end();
  }
}

/**
 * Runs `work` on a fresh database migrated up to (not including) the migration whose tag ends with
 * `tagSuffix`, so a test can store rows the old way and then apply the rest; dropped afterwards.
 */
async function withDatabaseBefore(
  tagSuffix: string,
  work: (pool: pg.Pool) => Promise<void>,
): Promise<void> {
  const oldName = `${databaseName}_${tagSuffix.slice(0, 20)}`;
  const oldUrl = Object.assign(new URL(serverUrl), { pathname: `/${oldName}` }).toString();
  const partialFolder = mkdtempSync(path.join(tmpdir(), "partita-migrations-"));
  await onServer((client) => client.query(`CREATE DATABASE ${pg.escapeIdentifier(oldName)}`));
  const pool = new pg.Pool({ connectionString: oldUrl, max: 1 });
  try {
    cpSync(migrationsFolder, partialFolder, { recursive: true });
    const journalPath = path.join(partialFolder, "meta", "_journal.json");
    const journal = JSON.parse(readFileSync(journalPath, "utf8")) as { entries: { tag: string }[] };
    const cut = journal.entries.findIndex((entry) => entry.tag.endsWith(tagSuffix));
    expect(cut).toBeGreaterThan(0);
    writeFileSync(
      journalPath,
      JSON.stringify({ ...journal, entries: journal.entries.slice(0, cut) }),
    );
    await migrate(drizzle(pool), { migrationsFolder: partialFolder });
    await work(pool);
  } finally {
    await pool.end();
    rmSync(partialFolder, { recursive: true, force: true });
    await onServer((client) =>
      client.query(`DROP DATABASE IF EXISTS ${pg.escapeIdentifier(oldName)} WITH (FORCE)`),
    );
  }
}

describe("migrations", () => {
  beforeAll(() =>
    onServer((client) => client.query(`CREATE DATABASE ${pg.escapeIdentifier(databaseName)}`)),
  );
  afterAll(() =>
    onServer((client) =>
      client.query(`DROP DATABASE IF EXISTS ${pg.escapeIdentifier(databaseName)} WITH (FORCE)`),
    ),
  );

  async function publicTables(): Promise<string[]> {
    const client = new pg.Client({ connectionString: databaseUrl });
    await client.connect();
    try {
      const result = await client.query<{ table_name: string }>(
        "SELECT table_name FROM information_schema.tables WHERE table_schema = 'public'",
      );
      return result.rows.map((row) => row.table_name);
    } finally {
      await client.end();
    }
  }

  it("apply to an empty database and create the foundation's tables", async () => {
    expect(await publicTables()).toEqual([]);
    expect(await applyMigrations(databaseUrl)).toBe(true);
    const tables = await publicTables();
    for (const table of ["users", "workspaces", "memberships", "invitations"]) {
      expect(tables).toContain(table);
    }
  });

  it("are idempotent: applying again changes nothing", async () => {
    const before = (await publicTables()).sort();
    expect(await applyMigrations(databaseUrl)).toBe(true);
    expect((await publicTables()).sort()).toEqual(before);
  });

  it("keep rate-limit counters out of the write-ahead log, and only them", async () => {
    // relpersistence 'u' is PostgreSQL's mark of an unlogged table (pg_class, PostgreSQL docs).
    const client = new pg.Client({ connectionString: databaseUrl });
    await client.connect();
    try {
      const unlogged = await client.query<{ relname: string }>(
        `SELECT c.relname FROM pg_class c JOIN pg_namespace n ON n.oid = c.relnamespace
         WHERE n.nspname = 'public' AND c.relkind = 'r' AND c.relpersistence = 'u'`,
      );
      expect(unlogged.rows.map((row) => row.relname)).toEqual(["rate_limits"]);
    } finally {
      await client.end();
    }
  });

  it("convert stored review words: decisions, preferences and audit entries", async () => {
    // A second database, migrated only up to the migration before the vocabulary change, holds
    // rows in the old words; the full set of migrations must convert them.
    await withDatabaseBefore("review_words_of_our_own", async (pool) => {
      await pool.query(
        `INSERT INTO audit_log (id, workspace_id, actor_id, actor_email, action, target_type, target_id, details)
         VALUES ('a1', 'w', 'u', 'u@example.test', 'review.requested', 'report', 'r', '{"version": 1}'),
                ('a2', 'w', 'u', 'u@example.test', 'review.decided', 'report', 'r', '{"decision": "approve", "reason": "ok"}'),
                ('a3', 'w', 'u', 'u@example.test', 'review.decided', 'report', 'r', '{"decision": "changes-requested", "reason": "no"}'),
                ('a4', 'w', 'u', 'u@example.test', 'member.invited', 'user', 'x', '{}')`,
      );

      await migrate(drizzle(pool), { migrationsFolder });

      const entries = await pool.query<{ id: string; action: string; decision: string | null }>(
        "SELECT id, action, details->>'decision' AS decision FROM audit_log ORDER BY id",
      );
      expect(entries.rows).toEqual([
        { id: "a1", action: "report.referred", decision: null },
        { id: "a2", action: "report.endorsed", decision: "endorse" },
        { id: "a3", action: "report.returned", decision: "return" },
        { id: "a4", action: "member.invited", decision: null },
      ]);
      const labels = await pool.query<{ typname: string; labels: string[] }>(
        `SELECT t.typname, array_agg(e.enumlabel ORDER BY e.enumsortorder)::text[] AS labels
         FROM pg_enum e JOIN pg_type t ON t.oid = e.enumtypid
         WHERE t.typname IN ('review_decision_kind', 'notification_kind') GROUP BY t.typname ORDER BY t.typname`,
      );
      expect(labels.rows).toEqual([
        {
          typname: "notification_kind",
          labels: ["referred", "decision-made", "mentioned", "analysis-finished"],
        },
        { typname: "review_decision_kind", labels: ["endorse", "return"] },
      ]);
      // The append-only guard is back after the conversion.
      await expect(pool.query("DELETE FROM audit_log WHERE id = 'a4'")).rejects.toThrow();
    });
  });

  it("give stored reports their summary header and each shard its label counts", async () => {
    // A database migrated up to the migration before, holding a report stored the old way.
    await withDatabaseBefore("report_summary_header_and_shard_label_counts", async (pool) => {
      // The summary's text as stored (json keeps it byte for byte), two shards in stored order.
      const shards = [
        { id: "a", rows: 3, labelCounts: [2, 1, 0] },
        { id: "b", rows: 4, labelCounts: [0, 1, 3] },
      ];
      const summary = { engineVersion: "1", shards, advice: { verdict: "local-updates" } };
      await pool.query(
        `INSERT INTO users (id, email) VALUES ('u', 'u@example.test');
         INSERT INTO workspaces (id, name) VALUES ('w', 'W');
         INSERT INTO data_files (id, workspace_id, kind, name, object_key, size_bytes, uploaded_by)
           VALUES ('f', 'w', 'dataset', 'd.csv', 'k', 1, 'u');
         INSERT INTO analyses (id, workspace_id, title, dataset_file_id, parameters, created_by)
           VALUES ('an', 'w', 'T', 'f', '{}', 'u')`,
      );
      await pool.query(
        `INSERT INTO reports (id, workspace_id, analysis_id, lineage_id, version, title, verdict,
           dataset_rows, shard_count, summary, parameters, inputs, engine_version, timings, author_id)
         VALUES ('r', 'w', 'an', 'r', 1, 'T', 'local-updates', 7, 2, $1, '{}', '[]', '1', '{}', 'u')`,
        [JSON.stringify(summary)],
      );
      for (const [ordinal, shard] of shards.entries()) {
        await pool.query(
          `INSERT INTO report_shards (report_id, ordinal, shard_id, rows, tv, hellinger, js, kl,
             grad_norm2, sigma2, loss, classes_present, effective_classes, feature_shift)
           VALUES ('r', $1, $2, $3, 0, 0, 0, 0, 0, 0, 0, 0, 0, 0)`,
          [ordinal, shard.id, shard.rows],
        );
      }

      await migrate(drizzle(pool), { migrationsFolder });

      const report = await pool.query("SELECT summary_header, summary FROM reports");
      expect(report.rows).toEqual([{ summary_header: { ...summary, shards: [] }, summary }]);
      const counts = await pool.query(
        "SELECT shard_id, label_counts FROM report_shards ORDER BY ordinal",
      );
      expect(counts.rows).toEqual(
        shards.map((shard) => ({ shard_id: shard.id, label_counts: shard.labelCounts })),
      );
    });
  });
});
