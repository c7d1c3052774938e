import "server-only";
import { and, desc, eq, isNull, lt, or } from "drizzle-orm";
import { db } from "@/db/client";
import { federatedAnalyses, federatedClientKeys, federatedClients } from "@/db/schema";
import { TOKEN_USE_RESOLUTION_MS } from "./api-tokens";

/** What the roster shows of a key: never its hash. */
export type ClientKeyListItem = {
  id: string;
  client: string;
  expiresAt: Date;
  revokedAt: Date | null;
  lastUsedAt: Date | null;
  createdAt: Date;
};

const listColumns = {
  id: federatedClientKeys.id,
  client: federatedClients.name,
  expiresAt: federatedClientKeys.expiresAt,
  revokedAt: federatedClientKeys.revokedAt,
  lastUsedAt: federatedClientKeys.lastUsedAt,
  createdAt: federatedClientKeys.createdAt,
};

export async function insertClientKey(values: {
  clientId: string;
  keyHash: string;
  expiresAt: Date;
  createdBy: string;
}): Promise<{ id: string; expiresAt: Date }> {
  const [inserted] = await db()
    .insert(federatedClientKeys)
    .values(values)
    .returning({ id: federatedClientKeys.id, expiresAt: federatedClientKeys.expiresAt });
  return inserted;
}

/** The keys of one federated analysis, newest first, revoked and expired ones included. */
export async function listClientKeys(analysisId: string): Promise<ClientKeyListItem[]> {
  return db()
    .select(listColumns)
    .from(federatedClientKeys)
    .innerJoin(federatedClients, eq(federatedClients.id, federatedClientKeys.clientId))
    .where(eq(federatedClients.federatedAnalysisId, analysisId))
    .orderBy(desc(federatedClientKeys.createdAt));
}

/** Revokes a live key of this analysis in this workspace; undefined when there is none. */
export async function revokeClientKey(
  workspaceId: string,
  analysisId: string,
  keyId: string,
  now = new Date(),
): Promise<{ client: string } | undefined> {
  const [key] = await db()
    .select({ id: federatedClientKeys.id, client: federatedClients.name })
    .from(federatedClientKeys)
    .innerJoin(federatedClients, eq(federatedClients.id, federatedClientKeys.clientId))
    .innerJoin(federatedAnalyses, eq(federatedAnalyses.id, federatedClients.federatedAnalysisId))
    .where(
      and(
        eq(federatedClientKeys.id, keyId),
        isNull(federatedClientKeys.revokedAt),
        eq(federatedAnalyses.id, analysisId),
        eq(federatedAnalyses.workspaceId, workspaceId),
      ),
    );
  if (!key) return undefined;
  await db()
    .update(federatedClientKeys)
    .set({ revokedAt: now })
    .where(eq(federatedClientKeys.id, key.id));
  return { client: key.client };
}

/** What a presented key grants: its client and analysis. The caller judges expiry and revocation. */
export type ClientKeyGrant = {
  keyId: string;
  expiresAt: Date;
  revokedAt: Date | null;
  client: { id: string; name: string };
  analysisId: string;
  workspaceId: string;
};

export async function findClientKeyGrant(keyHash: string): Promise<ClientKeyGrant | undefined> {
  const [row] = await db()
    .select({
      keyId: federatedClientKeys.id,
      expiresAt: federatedClientKeys.expiresAt,
      revokedAt: federatedClientKeys.revokedAt,
      clientId: federatedClients.id,
      clientName: federatedClients.name,
      analysisId: federatedAnalyses.id,
      workspaceId: federatedAnalyses.workspaceId,
    })
    .from(federatedClientKeys)
    .innerJoin(federatedClients, eq(federatedClients.id, federatedClientKeys.clientId))
    .innerJoin(federatedAnalyses, eq(federatedAnalyses.id, federatedClients.federatedAnalysisId))
    .where(eq(federatedClientKeys.keyHash, keyHash));
  if (!row) return undefined;
  return {
    keyId: row.keyId,
    expiresAt: row.expiresAt,
    revokedAt: row.revokedAt,
    client: { id: row.clientId, name: row.clientName },
    analysisId: row.analysisId,
    workspaceId: row.workspaceId,
  };
}

export async function recordClientKeyUse(keyId: string, now = new Date()): Promise<void> {
  // As for API tokens: a client's long polls would otherwise write on every request.
  const recentEnough = new Date(now.getTime() - TOKEN_USE_RESOLUTION_MS);
  await db()
    .update(federatedClientKeys)
    .set({ lastUsedAt: now })
    .where(
      and(
        eq(federatedClientKeys.id, keyId),
        or(
          isNull(federatedClientKeys.lastUsedAt),
          lt(federatedClientKeys.lastUsedAt, recentEnough),
        ),
      ),
    );
}
