import { Worker } from "node:worker_threads";
import type { AnalysisProgress, SimulationProgress } from "@/lib/analysis";
import type { EngineThreadInput, EngineThreadMessage } from "./engine-thread-protocol";

/** The run was stopped because its analysis was cancelled. */
export class CancelledError extends Error {
  constructor() {
    super("the analysis was cancelled");
    this.name = "CancelledError";
  }
}

/** Storage did not answer while the engine read its inputs; the run may be tried again. */
export class StorageUnreachableError extends Error {
  constructor(detail: string) {
    super(`storage unreachable: ${detail}`);
    this.name = "StorageUnreachableError";
  }
}

export type EngineOutcome =
  | Extract<EngineThreadMessage, { type: "finished" }>
  | Extract<EngineThreadMessage, { type: "input-error" }>;

/**
 * Runs the engine on stored inputs in a worker thread and resolves with its summary or its
 * input-error message. The engine's fitting and measuring are long synchronous computations (a
 * minute or more on a million rows); in a thread of their own they leave this thread free to
 * store progress and notice a cancellation, and aborting `signal` ends the run at once — even in
 * the middle of a computation — by terminating the thread (it holds no database state).
 * Rejects with CancelledError on abort, and with an Error for anything internal.
 */
export function runEngineInThread(
  input: EngineThreadInput,
  hooks: {
    onProgress(progress: AnalysisProgress): void;
    onSimulationProgress(progress: SimulationProgress): void;
    signal: AbortSignal;
  },
): Promise<EngineOutcome> {
  return new Promise((resolve, reject) => {
    if (hooks.signal.aborted) {
      reject(new CancelledError());
      return;
    }
    // An explicit empty execArgv: the thread needs none of the parent's flags (a test runner's,
    // say), and registers its own TypeScript loader.
    const thread = new Worker(new URL("./analysis-thread-entry.mjs", import.meta.url), {
      workerData: input,
      execArgv: [],
    });
    let settled = false;
    const settle = (finish: () => void) => {
      if (settled) return;
      settled = true;
      hooks.signal.removeEventListener("abort", onAbort);
      // The storage client's kept-alive sockets would hold a finished thread open.
      void thread.terminate();
      finish();
    };
    const onAbort = () => settle(() => reject(new CancelledError()));
    hooks.signal.addEventListener("abort", onAbort);

    thread.on("message", (message: EngineThreadMessage) => {
      if (settled) return;
      switch (message.type) {
        case "progress":
          hooks.onProgress(message.progress);
          return;
        case "simulation-progress":
          hooks.onSimulationProgress(message.progress);
          return;
        case "finished":
        case "input-error":
          settle(() => resolve(message));
          return;
        case "storage-unreachable":
          settle(() => reject(new StorageUnreachableError(message.detail)));
          return;
        case "internal-error":
          settle(() => reject(new Error(`engine thread: ${message.detail}`)));
      }
    });
    thread.on("error", (error) => settle(() => reject(error)));
    thread.on("exit", (code) =>
      settle(() => reject(new Error(`engine thread exited (code ${code}) without a result`))),
    );
  });
}
