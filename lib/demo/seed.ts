import "server-only";
import { drizzle } from "drizzle-orm/node-postgres";
import { and, eq, inArray, isNull } from "drizzle-orm";
import { Pool } from "pg";
import { hashPassword } from "@/lib/auth/password";
import type { Role } from "@/lib/auth/roles";
import { stopSendingBoss } from "@/lib/jobs";
import { closeDb } from "@/db/client";
import * as schema from "@/db/schema";
import { seedDemoAnalyses } from "./seed-analyses";

export type DemoAccount = { email: string; password: string; role: Role };

/** Demo only: invented people in an invented cooperative; listed in the README. */
export const DEMO_WORKSPACE_NAME = "Valley orchards cooperative (demo)";
export const DEMO_ACCOUNTS: readonly (DemoAccount & { name: string })[] = [
  {
    name: "Demo Owner",
    email: "owner@demo.partita.local",
    password: "partita-demo-owner",
    role: "owner",
  },
  {
    name: "Demo Analyst",
    email: "analyst@demo.partita.local",
    password: "partita-demo-analyst",
    role: "analyst",
  },
  {
    name: "Demo Reviewer",
    email: "reviewer@demo.partita.local",
    password: "partita-demo-reviewer",
    role: "reviewer",
  },
];

/**
 * Creates the demo workspace with an owner, an analyst and a reviewer, then uploads the demo files
 * and queues its two analyses for the worker. Idempotent: what exists already is left alone, so
 * every start may call it.
 */
export async function seedDemo(databaseUrl: string): Promise<DemoAccount[]> {
  const pool = new Pool({ connectionString: databaseUrl, max: 1 });
  try {
    const database = drizzle(pool, { schema });
    const [owner] = DEMO_ACCOUNTS;
    const existing = await database
      .select({ id: schema.users.id })
      .from(schema.users)
      .where(eq(schema.users.email, owner.email));
    if (existing.length === 0) {
      const hashed = await Promise.all(
        DEMO_ACCOUNTS.map((account) => hashPassword(account.password)),
      );
      await database.transaction(async (tx) => {
        const [workspace] = await tx
          .insert(schema.workspaces)
          .values({ name: DEMO_WORKSPACE_NAME })
          .returning({ id: schema.workspaces.id });
        for (const [index, account] of DEMO_ACCOUNTS.entries()) {
          const [user] = await tx
            .insert(schema.users)
            .values({
              name: account.name,
              email: account.email,
              passwordHash: hashed[index],
              emailVerified: new Date(),
            })
            .returning({ id: schema.users.id });
          await tx
            .insert(schema.memberships)
            .values({ workspaceId: workspace.id, userId: user.id, role: account.role });
        }
      });
    }
    // Demo databases from before addresses had to be proven: the invented demo addresses count
    // as proven, so the listed demo passwords keep working.
    await database
      .update(schema.users)
      .set({ emailVerified: new Date() })
      .where(
        and(
          inArray(
            schema.users.email,
            DEMO_ACCOUNTS.map((account) => account.email),
          ),
          isNull(schema.users.emailVerified),
        ),
      );
    const [analyst] = await database
      .select({ userId: schema.memberships.userId, workspaceId: schema.memberships.workspaceId })
      .from(schema.memberships)
      .innerJoin(schema.users, eq(schema.users.id, schema.memberships.userId))
      .where(eq(schema.users.email, DEMO_ACCOUNTS[1].email));
    try {
      await seedDemoAnalyses(analyst.workspaceId, analyst.userId);
    } finally {
      await stopSendingBoss();
      await closeDb();
    }
    return DEMO_ACCOUNTS.map(({ email, password, role }) => ({ email, password, role }));
  } finally {
    await pool.end();
  }
}
