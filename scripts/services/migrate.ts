import { existsSync } from "node:fs";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { drizzle } from "drizzle-orm/node-postgres";
import { migrate } from "drizzle-orm/node-postgres/migrator";
import pg from "pg";

/** The migrations drizzle-kit generates from db/schema (`npm run db:generate`). */
export const migrationsFolder = path.resolve(
  path.dirname(fileURLToPath(import.meta.url)),
  "../../drizzle",
);

/**
 * Applies every migration in drizzle/ that the database has not seen yet (drizzle records them in
 * its own `drizzle.__drizzle_migrations` table). Returns false when there are no migrations yet.
 */
export async function applyMigrations(databaseUrl: string): Promise<boolean> {
  if (!existsSync(path.join(migrationsFolder, "meta", "_journal.json"))) return false;
  const pool = new pg.Pool({ connectionString: databaseUrl, max: 1 });
  try {
    await migrate(drizzle(pool), { migrationsFolder });
    return true;
  } finally {
    await pool.end();
  }
}
