import "server-only";
import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import { Pool } from "pg";
import { env } from "@/lib/env";
import { stopListening } from "./notifications";
import * as schema from "./schema";

export type Database = NodePgDatabase<typeof schema>;

// One pool per process; kept on globalThis so development reloads do not leak connections.
const holder = globalThis as typeof globalThis & { partitaPool?: Pool; partitaDb?: Database };

export function db(): Database {
  if (!holder.partitaDb) {
    const pool = new Pool({ connectionString: env().DATABASE_URL, max: 10 });
    pool.on("error", logLostConnection);
    holder.partitaPool = pool;
    holder.partitaDb = drizzle(holder.partitaPool, { schema });
  }
  return holder.partitaDb;
}

/** The process's pool itself, for libraries that take a pg Pool (the shared rate limits). */
export function dbPool(): Pool {
  db();
  return holder.partitaPool!;
}

/**
 * An idle pooled connection that the server closed (a restart, a network reset) is reported here;
 * without a listener Node would crash the process. The pool drops that connection and opens a new
 * one for the next query, so one line is all it takes.
 */
function logLostConnection(error: Error) {
  console.error(`[database] lost an idle connection (${error.message}); reconnecting on next use`);
}

/**
 * Closes the pool and the notification connection; tests and scripts call it so the process can
 * exit.
 */
export async function closeDb(): Promise<void> {
  await stopListening();
  await holder.partitaPool?.end();
  holder.partitaPool = undefined;
  holder.partitaDb = undefined;
}
