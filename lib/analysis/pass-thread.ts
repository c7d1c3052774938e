// The body of a pass-pool worker thread (see pass-pool.ts): keeps the designs it is given (shared
// memory, nothing copied) and joins every job, claiming tasks until none are left. Progress is
// signalled through the job's shared control array; only readiness and failures are posted.
import { parentPort, workerData } from "node:worker_threads";
import {
  CONTROL_ACTIVE,
  createScratch,
  runTasks,
  type PassThreadData,
  type PassThreadMessage,
  type PassThreadReport,
  type SharedDesignData,
} from "./pass-jobs";

const port = parentPort!;
// Set by pass-pool.ts, the only code that starts this thread.
const { workerTasks } = workerData as PassThreadData;
const designs = new Map<number, SharedDesignData>();
const scratch = createScratch();

port.on("message", (message: PassThreadMessage) => {
  if (message.type === "share") {
    designs.set(message.design.id, message.design);
    return;
  }
  const { job, control } = message;
  Atomics.add(control, CONTROL_ACTIVE, 1);
  try {
    const ran = runTasks(job, designs.get(job.designId) as SharedDesignData, control, scratch);
    Atomics.add(workerTasks, 0, ran);
  } catch (error) {
    const detail = error instanceof Error ? (error.stack ?? error.message) : String(error);
    port.postMessage({ type: "failed", detail } satisfies PassThreadReport);
  } finally {
    Atomics.sub(control, CONTROL_ACTIVE, 1);
    Atomics.notify(control, CONTROL_ACTIVE);
  }
});
port.postMessage({ type: "ready" } satisfies PassThreadReport);
