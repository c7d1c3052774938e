// The body of the layout planner's worker thread (see run-plan-thread.ts): reads the dataset from
// storage once, runs the planner, stores each scored candidate's map and posts progress and
// outcomes to the parent. It touches no database, so terminating it at any moment is safe.
import { randomUUID } from "node:crypto";
import { parentPort, workerData } from "node:worker_threads";
import { AnalysisInputError, planLayouts, writeLayoutMap } from "@/lib/analysis";
import { isStorageUnreachable, putObject } from "@/lib/storage";
import { buildUploadKey } from "@/lib/uploads/file-rules";
import { openHashedObject } from "@/lib/reports/hashed-object";
import type { PlanThreadInput, PlanThreadMessage } from "./plan-thread-protocol";

const INTERNAL_CANDIDATE_FAILURE =
  "An internal error stopped this candidate (not your data); the other candidates went on.";

function post(message: PlanThreadMessage) {
  parentPort!.postMessage(message);
}

async function run(input: PlanThreadInput) {
  const dataset = openHashedObject(input.dataset);
  await planLayouts({
    data: dataset.stream,
    dataName: input.dataset.name,
    dataBytes: input.dataset.sizeBytes,
    options: input.options,
    groupColumn: input.groupColumn ?? undefined,
    shardCount: input.shardCount,
    specs: input.specs,
    seed: input.seed,
    skipIndexes: new Set(input.finishedIndexes),
    onProgress(progress) {
      if (progress.stage === "candidate") {
        if (progress.status === "running") {
          post({
            type: "candidate-progress",
            index: progress.index,
            status: "running",
            progress: progress.analysis ?? null,
          });
        }
        return;
      }
      post({ type: "plan-progress", progress });
    },
    async onCandidate(outcome) {
      if ("failure" in outcome) {
        const { failure } = outcome;
        // A defect's message is for the server's log, never for the user.
        if (!failure.badInput) console.error(`[layout ${failure.name}] ${failure.message}`);
        post({
          type: "candidate-failed",
          index: outcome.index,
          failure: failure.badInput ? failure : { ...failure, message: INTERNAL_CANDIDATE_FAILURE },
        });
        return;
      }
      const { candidate, rowIds, assignment } = outcome;
      // Stored where uploads live, so "Analyse this layout" registers it like an uploaded map.
      const map = Buffer.from(writeLayoutMap(rowIds, assignment, input.shardCount), "utf8");
      const key = buildUploadKey(input.workspaceId, `${candidate.name}.csv`, randomUUID());
      await putObject({ key, body: map, contentLength: map.length, contentType: "text/csv" });
      post({
        type: "candidate-done",
        index: outcome.index,
        summary: candidate.summary,
        mapObjectKey: key,
        mapSizeBytes: map.length,
      });
    },
  });
  post({ type: "finished" });
}

// Set by run-plan-thread.ts, the only code that starts this thread.
run(workerData as PlanThreadInput).catch((error: unknown) => {
  if (error instanceof AnalysisInputError) {
    post({ type: "input-error", message: error.message });
  } else if (isStorageUnreachable(error)) {
    post({ type: "storage-unreachable", detail: error instanceof Error ? error.message : "" });
  } else {
    const detail = error instanceof Error ? (error.stack ?? error.message) : String(error);
    post({ type: "internal-error", detail });
  }
});
