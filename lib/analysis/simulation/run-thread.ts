// The body of a simulation worker thread (see run-threads.ts): does the runs it is sent, one at a
// time, with the same `runAlgorithm` as the calling thread, reporting each round and the outcome.
import { parentPort, workerData } from "node:worker_threads";
import { runAlgorithm } from "./run-algorithm";
import type { RunRequest, RunThreadData, RunThreadReport } from "./run-thread-protocol";

const port = parentPort!;
// Set by run-threads.ts, the only code that starts this thread.
const { problem, plan } = workerData as RunThreadData;
const post = (report: RunThreadReport, transfer: ArrayBuffer[] = []) =>
  port.postMessage(report, transfer);

port.on("message", async (request: RunRequest) => {
  try {
    const outcome = await runAlgorithm(
      request.algorithm,
      problem,
      plan,
      request.stepSize,
      request.seed,
      request.curveRounds,
      { onRound: (round) => post({ type: "round", round }) },
    );
    const { suboptimality, diverged } = outcome;
    post({ type: "done", suboptimality, diverged }, [suboptimality.buffer as ArrayBuffer]);
  } catch (error) {
    post({
      type: "failed",
      detail: error instanceof Error ? (error.stack ?? error.message) : String(error),
    });
  }
});
post({ type: "ready" });
