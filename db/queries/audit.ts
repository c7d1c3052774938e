import "server-only";
import { and, desc, eq, gte, lt, type SQL } from "drizzle-orm";
import { db, type Database } from "@/db/client";
import { auditLog, type AuditAction } from "@/db/schema";
import type { AuditFilters } from "@/lib/reviews/audit-filters";

export type AuditEntry = typeof auditLog.$inferSelect;

/** Who did it: the signed-in person or the holder of the API token used. */
export type AuditActor = { id: string; email: string };

export interface NewAuditEntry {
  workspaceId: string;
  actor: AuditActor;
  action: AuditAction;
  targetType:
    | "member"
    | "invitation"
    | "report"
    | "comment"
    | "api-token"
    | "client-key"
    | "federated-analysis";
  targetId: string;
  details?: Record<string, unknown>;
}

/** Anything that can insert: the database or an open transaction (so the entry commits with the change). */
type Inserter = Pick<Database, "insert">;

/**
 * Appends one entry. This module offers no update or delete on purpose: the log is append-only,
 * and the database refuses UPDATE/DELETE on it as well (trigger in drizzle/0004).
 */
export async function recordAudit(entry: NewAuditEntry, executor: Inserter = db()): Promise<void> {
  await executor.insert(auditLog).values({
    workspaceId: entry.workspaceId,
    actorId: entry.actor.id,
    actorEmail: entry.actor.email,
    action: entry.action,
    targetType: entry.targetType,
    targetId: entry.targetId,
    details: entry.details ?? {},
  });
}

function filterConditions(workspaceId: string, filters: AuditFilters): SQL[] {
  const conditions = [eq(auditLog.workspaceId, workspaceId)];
  if (filters.action) conditions.push(eq(auditLog.action, filters.action));
  if (filters.actor) conditions.push(eq(auditLog.actorId, filters.actor));
  if (filters.from) conditions.push(gte(auditLog.createdAt, new Date(`${filters.from}T00:00:00Z`)));
  if (filters.to) {
    const dayAfter = new Date(`${filters.to}T00:00:00Z`);
    dayAfter.setUTCDate(dayAfter.getUTCDate() + 1);
    conditions.push(lt(auditLog.createdAt, dayAfter));
  }
  return conditions;
}

/** A workspace's audit entries matching the filters, newest first (dates are whole UTC days). */
export async function listAuditEntries(
  workspaceId: string,
  filters: AuditFilters = {},
  limit = 200,
): Promise<AuditEntry[]> {
  return db()
    .select()
    .from(auditLog)
    .where(and(...filterConditions(workspaceId, filters)))
    .orderBy(desc(auditLog.createdAt))
    .limit(limit);
}

/** Everyone who appears as an actor in the workspace's log, for the actor filter. */
export async function listAuditActors(
  workspaceId: string,
): Promise<{ id: string; email: string }[]> {
  return db()
    .selectDistinct({ id: auditLog.actorId, email: auditLog.actorEmail })
    .from(auditLog)
    .where(eq(auditLog.workspaceId, workspaceId))
    .orderBy(auditLog.actorEmail);
}
