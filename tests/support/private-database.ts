import pg from "pg";
import { applyMigrations } from "@/scripts/services/migrate";

// A database of its own on the test PostgreSQL server, for a test whose own worker or mail sender
// must not share rows with the test services' worker.

/** Creates the database `url` names and applies every migration to it. */
export async function createMigratedDatabase(url: string): Promise<void> {
  await administer(url, `create database ${databaseName(url)}`);
  await applyMigrations(url);
}

export async function dropDatabase(url: string): Promise<void> {
  await administer(url, `drop database if exists ${databaseName(url)} with (force)`);
}

function databaseName(url: string): string {
  return new URL(url).pathname.slice(1);
}

/** Runs a statement on the server's maintenance database. */
async function administer(url: string, statement: string) {
  const maintenance = new URL(url);
  maintenance.pathname = "/postgres";
  const client = new pg.Client({ connectionString: maintenance.toString() });
  await client.connect();
  try {
    await client.query(statement);
  } finally {
    await client.end();
  }
}
