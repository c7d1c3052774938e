import "server-only";
import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import { Pool } from "pg";
import { env } from "@/lib/env";
import * as schema from "./schema";

export type Database = NodePgDatabase<typeof schema>;

// One pool per process; kept on globalThis so development reloads do not leak connections.
const holder = globalThis as typeof globalThis & { partitaPool?: Pool; partitaDb?: Database };

export function db(): Database {
  if (!holder.partitaDb) {
    holder.partitaPool = new Pool({ connectionString: env().DATABASE_URL, max: 10 });
    holder.partitaDb = drizzle(holder.partitaPool, { schema });
  }
  return holder.partitaDb;
}

/** Closes the pool; tests and scripts call it so the process can exit. */
export async function closeDb(): Promise<void> {
  await holder.partitaPool?.end();
  holder.partitaPool = undefined;
  holder.partitaDb = undefined;
}
