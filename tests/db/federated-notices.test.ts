// The notifications that wake a federated analysis's waits (PostgreSQL's LISTEN/NOTIFY, against the
// real PostgreSQL that `npm test` starts): the coordinator's wait for a client's answer and the
// client's long poll for the next question. Each write the other side waits for reaches the
// listeners of its client, and only them. Every check waits for the notification itself; a missing
// one fails the test by its timeout.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { closeDb } from "@/db/client";
import { findFederatedClientByName, moveFederatedState } from "@/db/queries/federated-analyses";
import { answerExchange, openExchange } from "@/db/queries/federated-digests";
import { listenToFederatedClient } from "@/db/queries/federated-notices";
import { stopSendingBoss } from "@/lib/jobs";
import {
  cancelFederatedAnalysis,
  createFederatedAnalysis,
  waitForClientWork,
} from "@/lib/federated";
import { createTeam } from "@/tests/support/accounts";
import { countNotices } from "@/tests/support/notice-counter";

let team: Awaited<ReturnType<typeof createTeam>>;
const started: string[] = [];

beforeAll(async () => {
  team = await createTeam();
});

afterAll(async () => {
  for (const analysisId of started) {
    await cancelFederatedAnalysis(team.workspaceId, team.analyst, analysisId).catch(() => {});
  }
  await stopSendingBoss();
  await closeDb();
});

async function createAnalysis() {
  const { analysisId } = await createFederatedAnalysis(team.workspaceId, team.analyst.id, {
    title: "Notices",
    labelColumn: "label",
    reference: "zero",
    clients: ["east", "west"],
  });
  started.push(analysisId);
  const clientId = async (name: string) => (await findFederatedClientByName(analysisId, name))!.id;
  return { analysisId, east: await clientId("east"), west: await clientId("west") };
}

describe("notifications between a federated analysis's coordinator and its clients", () => {
  it("wakes a client on its questions and the state, and the coordinator on its answers", async () => {
    const { analysisId, east, west } = await createAnalysis();
    const eastPoll = await countNotices((onNotice) =>
      listenToFederatedClient({ analysisId, clientId: east }, ["question", "state"], onNotice),
    );
    const westPoll = await countNotices((onNotice) =>
      listenToFederatedClient({ analysisId, clientId: west }, ["question", "state"], onNotice),
    );
    const eastAnswers = await countNotices((onNotice) =>
      listenToFederatedClient({ analysisId, clientId: east }, ["answer", "state"], onNotice),
    );

    // A question to west, then one to east. Listeners of this process share one connection,
    // which hears notifications in commit order: once east's has arrived, west's has too.
    const question = { federatedAnalysisId: analysisId, kind: "evaluate" as const };
    await openExchange({ ...question, clientId: west, requestKey: "a", request: { at: 1 } });
    const exchange = await openExchange({
      ...question,
      clientId: east,
      requestKey: "a",
      request: { at: 1 },
    });
    await eastPoll.until(1);
    expect([eastPoll.count, westPoll.count, eastAnswers.count]).toEqual([1, 1, 0]);
    // The same question again is stored once and wakes nobody; the answer wakes the coordinator.
    await openExchange({ ...question, clientId: east, requestKey: "a", request: { at: 1 } });
    expect(await answerExchange(east, exchange.id, { loss: 1 })).toBe(true);
    await eastAnswers.until(1);
    // A second answer to the same question is refused and wakes nobody; a change of state
    // concerns everyone, and being the last notification, every earlier one has arrived with it.
    expect(await answerExchange(east, exchange.id, { loss: 2 })).toBe(false);
    expect(await moveFederatedState(analysisId, ["collecting-schemas"], { state: "failed" })).toBe(
      true,
    );
    await westPoll.until(2);
    await eastPoll.until(2);
    await eastAnswers.until(2);
    expect([eastPoll.count, westPoll.count, eastAnswers.count]).toEqual([2, 2, 2]);
    for (const listener of [eastPoll, westPoll, eastAnswers]) listener.stop();
  });

  it("answers a waiting client's long poll with the question asked while it waited", async () => {
    const { analysisId, east } = await createAnalysis();
    const sender = { analysisId, client: { id: east, name: "east" } };
    const polled = waitForClientWork(sender, { waitMs: 60_000 });
    const exchange = await openExchange({
      federatedAnalysisId: analysisId,
      clientId: east,
      kind: "evaluate",
      requestKey: "b",
      request: { at: 2 },
    });
    await expect(polled).resolves.toEqual({
      kind: "evaluate",
      exchangeId: exchange.id,
      request: { at: 2 },
    });
  });
});
