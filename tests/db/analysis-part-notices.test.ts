// The notifications that wake the parts of an analysis shared by several workers and their
// coordinator (PostgreSQL's LISTEN/NOTIFY, against the real PostgreSQL that `npm test` starts):
// each write the other side waits for reaches the listeners of its part, and only them. Every
// check waits for the notification itself; a missing one fails the test by its timeout.
import { randomUUID } from "node:crypto";
import { afterAll, describe, expect, it } from "vitest";
import { closeDb, db } from "@/db/client";
import {
  answerPartExchange,
  listenToPart,
  openPartExchange,
  recordPartFailure,
  removePartExchanges,
  startPartRun,
} from "@/db/queries/analysis-parts";
import { analyses, dataFiles } from "@/db/schema";
import { createAccount } from "@/tests/support/accounts";
import { countNotices } from "@/tests/support/notice-counter";

afterAll(closeDb);

async function insertRunningAnalysis(): Promise<string> {
  const author = await createAccount("parts");
  const [dataset] = await db()
    .insert(dataFiles)
    .values({
      workspaceId: author.workspaceId,
      kind: "dataset",
      name: "rows.csv",
      objectKey: `workspaces/${author.workspaceId}/files/${randomUUID()}/rows.csv`,
      sizeBytes: 100,
      contentType: "text/csv",
      uploadedBy: author.id,
    })
    .returning({ id: dataFiles.id });
  const [analysis] = await db()
    .insert(analyses)
    .values({
      workspaceId: author.workspaceId,
      title: "Parts",
      datasetFileId: dataset.id,
      parameters: { labelColumn: "label", shardColumn: "shard" },
      status: "running",
      createdBy: author.id,
    })
    .returning({ id: analyses.id });
  return analysis.id;
}

describe("notifications between the parts of an analysis and their coordinator", () => {
  it("wakes a part on its questions and its run's changes, and the coordinator on its answers", async () => {
    const analysisId = await insertRunningAnalysis();
    const runId = randomUUID();
    const part = await countNotices((onNotice) =>
      listenToPart(analysisId, 0, ["question", "state"], onNotice),
    );
    const otherPart = await countNotices((onNotice) =>
      listenToPart(analysisId, 1, ["question", "state"], onNotice),
    );
    const coordinator = await countNotices((onNotice) =>
      listenToPart(analysisId, 0, ["answer", "state"], onNotice),
    );
    const span = { headerBytes: 10, startByte: 10, endByte: 50 };
    // A new run concerns every part.
    await startPartRun(analysisId, runId, [span, { ...span, startByte: 50, endByte: 90 }]);
    await Promise.all([part.until(1), otherPart.until(1), coordinator.until(1)]);

    // A question to part 2, then one to part 1. All listeners of this process share one
    // connection, which hears notifications in commit order: once part 1's has arrived, part 2's
    // has too, and part 1's listener has not heard of it.
    const question = { analysisId, runId, kind: "evaluate" as const, request: { at: 1 } };
    await openPartExchange({ ...question, partIndex: 1, requestKey: "a" });
    const exchange = await openPartExchange({ ...question, partIndex: 0, requestKey: "a" });
    await part.until(2);
    expect([part.count, otherPart.count, coordinator.count]).toEqual([2, 2, 1]);
    // The same question again is stored once and wakes nobody.
    await openPartExchange({ ...question, partIndex: 0, requestKey: "a" });
    await answerPartExchange(exchange.id, { rows: 1 });
    await coordinator.until(2);
    await recordPartFailure(analysisId, runId, 0, "the part cannot be read");
    await coordinator.until(3);
    // The run's end concerns every part; being the last notification, every earlier one has
    // arrived once the other part hears of it.
    await removePartExchanges(analysisId);
    await otherPart.until(3);
    expect([part.count, otherPart.count, coordinator.count]).toEqual([4, 3, 4]);
    for (const listener of [part, otherPart, coordinator]) listener.stop();
  });
});
