import "server-only";
import { and, asc, eq, inArray, isNull } from "drizzle-orm";
import { db } from "@/db/client";
import { federatedClients, federatedDigests, federatedExchanges } from "@/db/schema";
import { notifyClient } from "./federated-notices";

type DigestRound = (typeof federatedDigests.$inferSelect)["round"];
export type FederatedExchangeRow = typeof federatedExchanges.$inferSelect;
export type ExchangeKind = FederatedExchangeRow["kind"];

/**
 * Stores an accepted digest. One per client and round: a second one is not stored (false), so a
 * digest already merged is never replaced.
 */
export async function insertFederatedDigest(values: {
  clientId: string;
  round: DigestRound;
  document: unknown;
  sha256: string;
}): Promise<boolean> {
  const inserted = await db()
    .insert(federatedDigests)
    .values(values)
    .onConflictDoNothing()
    .returning({ id: federatedDigests.id });
  return inserted.length === 1;
}

export async function findFederatedDigest(
  clientId: string,
  round: DigestRound,
): Promise<{ document: unknown; sha256: string } | undefined> {
  const [row] = await db()
    .select({ document: federatedDigests.document, sha256: federatedDigests.sha256 })
    .from(federatedDigests)
    .where(and(eq(federatedDigests.clientId, clientId), eq(federatedDigests.round, round)));
  return row;
}

/** Every accepted digest of a round, by client id. */
export async function listFederatedDigests(
  analysisId: string,
  round: DigestRound,
): Promise<Map<string, unknown>> {
  const rows = await db()
    .select({ clientId: federatedDigests.clientId, document: federatedDigests.document })
    .from(federatedDigests)
    .innerJoin(federatedClients, eq(federatedClients.id, federatedDigests.clientId))
    .where(
      and(eq(federatedClients.federatedAnalysisId, analysisId), eq(federatedDigests.round, round)),
    );
  return new Map(rows.map((row) => [row.clientId, row.document]));
}

/** Asks a client a question once: the existing exchange when the same one was asked before. */
export async function openExchange(values: {
  federatedAnalysisId: string;
  clientId: string;
  kind: ExchangeKind;
  requestKey: string;
  request: unknown;
}): Promise<FederatedExchangeRow> {
  const asked = await db()
    .insert(federatedExchanges)
    .values(values)
    .onConflictDoNothing()
    .returning({ id: federatedExchanges.id });
  if (asked.length === 1) await notifyClient("question", values.clientId);
  const [row] = await db()
    .select()
    .from(federatedExchanges)
    .where(
      and(
        eq(federatedExchanges.clientId, values.clientId),
        eq(federatedExchanges.kind, values.kind),
        eq(federatedExchanges.requestKey, values.requestKey),
      ),
    );
  return row;
}

export async function findExchange(exchangeId: string): Promise<FederatedExchangeRow | undefined> {
  const [row] = await db()
    .select()
    .from(federatedExchanges)
    .where(eq(federatedExchanges.id, exchangeId));
  return row;
}

/** The client's oldest unanswered question (of this kind, when given), if any. */
export async function findOpenExchange(
  clientId: string,
  kind?: ExchangeKind,
): Promise<FederatedExchangeRow | undefined> {
  const [row] = await db()
    .select()
    .from(federatedExchanges)
    .where(
      and(
        eq(federatedExchanges.clientId, clientId),
        isNull(federatedExchanges.answeredAt),
        kind === undefined ? undefined : eq(federatedExchanges.kind, kind),
      ),
    )
    .orderBy(asc(federatedExchanges.createdAt))
    .limit(1);
  return row;
}

/** Records an answer once; false when the exchange was already answered (or is not the client's). */
export async function answerExchange(
  clientId: string,
  exchangeId: string,
  answer: unknown,
  now = new Date(),
): Promise<boolean> {
  const answered = await db()
    .update(federatedExchanges)
    .set({ answer, answeredAt: now })
    .where(
      and(
        eq(federatedExchanges.id, exchangeId),
        eq(federatedExchanges.clientId, clientId),
        isNull(federatedExchanges.answeredAt),
      ),
    )
    .returning({ id: federatedExchanges.id });
  if (answered.length === 0) return false;
  await notifyClient("answer", clientId);
  return true;
}

/** Answered exchanges among these ids (the coordinator's wait for a round). */
export async function findAnsweredExchanges(exchangeIds: string[]): Promise<Map<string, unknown>> {
  if (exchangeIds.length === 0) return new Map();
  const rows = await db()
    .select({ id: federatedExchanges.id, answer: federatedExchanges.answer })
    .from(federatedExchanges)
    .where(inArray(federatedExchanges.id, exchangeIds));
  return new Map(
    rows.filter((row) => row.answer !== null).map((row) => [row.id, row.answer] as const),
  );
}
