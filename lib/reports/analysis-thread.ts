// The body of the engine's worker thread (see engine-thread.ts): reads the inputs from storage,
// hashing them on the way, runs the engine and posts progress and the outcome to the parent. It
// touches no database, so terminating the thread at any moment is safe.
import { buffer } from "node:stream/consumers";
import { parentPort, workerData } from "node:worker_threads";
import type { ReportInput } from "@/db/schema/analyses";
import {
  AnalysisInputError,
  analyzePartition,
  DEFAULT_MEMORY_LIMIT_BYTES,
  type AnalysisProgress,
  type SimulationProgress,
} from "@/lib/analysis";
import { referenceWeightsSchema, type ReferenceWeights } from "@/lib/validation/analysis-options";
import { isStorageUnreachable } from "@/lib/storage";
import { openHashedObject, type StoredFile } from "./hashed-object";
import type { EngineThreadInput, EngineThreadMessage } from "./engine-thread-protocol";

function post(message: EngineThreadMessage) {
  parentPort!.postMessage(message);
}

/** Reads and checks an uploaded reference weights file (methods.md §2, "uploaded weights"). */
async function readReferenceWeights(
  file: StoredFile,
): Promise<{ weights: ReferenceWeights; input: ReportInput }> {
  const object = openHashedObject(file);
  const text = (await buffer(object.stream)).toString("utf8");
  const expected =
    'a JSON object {"classes": [names] or null, "features": [names], "weights": [[numbers]]}';
  let parsed: unknown;
  try {
    parsed = JSON.parse(text);
  } catch (error) {
    const reason = error instanceof SyntaxError ? error.message : "unreadable";
    throw new AnalysisInputError(`the file is not valid JSON (${reason})`, {
      file: file.name,
      expected,
    });
  }
  const checked = referenceWeightsSchema.safeParse(parsed);
  if (!checked.success) {
    const issue = checked.error.issues[0];
    throw new AnalysisInputError(`${issue.path.join(".") || "the file"}: ${issue.message}`, {
      file: file.name,
      expected,
    });
  }
  return { weights: checked.data, input: object.describe() };
}

/** Seconds spent in each stage, from the first report of one stage to the first of the next. */
function createStageClock() {
  const seconds: Record<string, number> = {};
  let current: { stage: string; since: number } | undefined;
  const close = (now: number) => {
    if (current)
      seconds[current.stage] = (seconds[current.stage] ?? 0) + (now - current.since) / 1000;
  };
  return {
    observe(progress: AnalysisProgress) {
      if (current?.stage === progress.stage) return;
      const now = performance.now();
      close(now);
      current = { stage: progress.stage, since: now };
    },
    finish(): Record<string, number> {
      close(performance.now());
      current = undefined;
      return seconds;
    },
  };
}

/** Least time between two simulation progress messages; the parent stores two a second at most. */
const SIMULATION_PROGRESS_MS = 100;

/**
 * Posts the simulation's progress without a message per round (a long plan has millions of rounds):
 * the first report of every run, its last round, and otherwise one every SIMULATION_PROGRESS_MS.
 */
function createSimulationProgressPoster(): (progress: SimulationProgress) => void {
  let lastRun = 0;
  let lastPostAt = -Infinity;
  return (progress) => {
    const now = performance.now();
    const due =
      progress.run !== lastRun ||
      progress.round === progress.rounds ||
      now - lastPostAt >= SIMULATION_PROGRESS_MS;
    if (!due) return;
    lastRun = progress.run;
    lastPostAt = now;
    post({ type: "simulation-progress", progress });
  };
}

async function run(input: EngineThreadInput) {
  const clock = createStageClock();
  const reference = input.weights ? await readReferenceWeights(input.weights) : undefined;
  const dataset = openHashedObject(input.dataset);
  const layout = input.layout ? openHashedObject(input.layout) : undefined;
  let spilled = false;
  const summary = await analyzePartition(
    {
      data: dataset.stream,
      dataName: input.dataset.name,
      dataBytes: input.dataset.sizeBytes,
      partition: layout?.stream,
      partitionName: input.layout?.name,
      referenceName: input.weights?.name,
      options: reference ? { ...input.options, reference: reference.weights } : input.options,
      memory: { ...input.memory, onScratchFile: () => (spilled = true) },
      onSimulationProgress: createSimulationProgressPoster(),
    },
    (progress) => {
      clock.observe(progress);
      post({ type: "progress", progress });
    },
  );
  const inputs = [dataset.describe()];
  if (layout) inputs.push(layout.describe());
  if (reference) inputs.push(reference.input);
  post({
    type: "finished",
    summary,
    inputs,
    stageSeconds: clock.finish(),
    spilledAtLimit: spilled ? (input.memory.limitBytes ?? DEFAULT_MEMORY_LIMIT_BYTES) : null,
  });
}

// Set by engine-thread.ts, the only code that starts this thread.
run(workerData as EngineThreadInput).catch((error: unknown) => {
  if (error instanceof AnalysisInputError) {
    post({ type: "input-error", message: error.message });
  } else if (isStorageUnreachable(error)) {
    post({ type: "storage-unreachable", detail: error instanceof Error ? error.message : "" });
  } else {
    const detail = error instanceof Error ? (error.stack ?? error.message) : String(error);
    post({ type: "internal-error", detail });
  }
});
