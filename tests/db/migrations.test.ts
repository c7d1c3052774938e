// Applies drizzle/ to a database created empty for this test on the test server (DATABASE_URL),
// then asks PostgreSQL's own catalogue which tables exist.
import { randomUUID } from "node:crypto";
import pg from "pg";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { applyMigrations } from "@/scripts/services/migrate";

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
});
