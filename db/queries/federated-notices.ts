import "server-only";
import { sql } from "drizzle-orm";
import { db } from "@/db/client";
import { listen } from "@/db/notifications";

// The federated analysis's waits — the coordinator for a client's answer, a client's long poll for
// the coordinator's next question — are woken by PostgreSQL notifications instead of polls. Every
// write one of them waits for is followed by a notice; notices are hints, so a waiter reads the rows
// and also looks again after a timeout in case one was lost.

/**
 * What a notice says: the coordinator asked a client a question, the client answered one, or the
 * analysis changed state (progress, a cancel, the report stored), so its waiters look again.
 */
export type FederatedNotice = "question" | "answer" | "state";

const FEDERATED_CHANNEL = "federated_analyses";

/** Questions and answers are about one client; a change of state is about the whole analysis. */
function noticePayload(notice: FederatedNotice, id: string) {
  return `${notice}:${id}`;
}

export async function notifyClient(notice: "question" | "answer", clientId: string) {
  await db().execute(
    sql`select pg_notify(${FEDERATED_CHANNEL}, ${noticePayload(notice, clientId)})`,
  );
}

export async function notifyFederatedState(analysisId: string) {
  await db().execute(
    sql`select pg_notify(${FEDERATED_CHANNEL}, ${noticePayload("state", analysisId)})`,
  );
}

/**
 * Calls `onNotice` on each of `notices` about the client (questions, answers) or its analysis
 * (state) from any process, until the returned function is called.
 */
export async function listenToFederatedClient(
  client: { analysisId: string; clientId: string },
  notices: FederatedNotice[],
  onNotice: () => void,
): Promise<() => void> {
  const payloads = new Set(
    notices.map((notice) =>
      noticePayload(notice, notice === "state" ? client.analysisId : client.clientId),
    ),
  );
  return listen(FEDERATED_CHANNEL, (payload) => {
    if (payloads.has(payload)) onNotice();
  });
}
