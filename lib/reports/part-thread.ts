// The body of an analysis part's thread (see part-rows-thread.ts): reads the part's byte range from
// storage, computes its round-1 digest, then answers the coordinator's questions from its encoded
// rows, which it keeps between the fit's rounds. It touches no database, and its scratch files are
// unlinked from the start, so ending the thread at any moment leaves nothing behind.
import { parentPort, workerData } from "node:worker_threads";
import {
  AnalysisInputError,
  encodingSchema,
  evaluationRequestSchema,
  LocalDigestClient,
  measurementRequestSchema,
  planOnePart,
  readDatasetPart,
  resolveMemorySettings,
  withFileRowNumbers,
} from "@/lib/analysis";
import { storedDatasetBytes } from "./stored-dataset-bytes";
import type {
  PartQuestionKind,
  PartThreadInput,
  PartThreadMessage,
  PartThreadRequest,
} from "./part-thread-protocol";

function post(message: PartThreadMessage) {
  parentPort!.postMessage(message);
}

function report(error: unknown) {
  if (error instanceof AnalysisInputError) {
    const { problem, file, row, column, option, expected } = error;
    post({ type: "input-error", problem, location: { file, row, column, option, expected } });
  } else {
    post({
      type: "internal-error",
      detail: error instanceof Error ? (error.stack ?? error.message) : String(error),
    });
  }
}

/** Reads the part and posts its schema digest; resolves with the client that answers the rest. */
async function readPart(input: PartThreadInput, signal: AbortSignal): Promise<LocalDigestClient> {
  const bytes = storedDatasetBytes(input.dataset);
  const plan = await planOnePart(bytes, input.range);
  let spilled = false;
  const memory = resolveMemorySettings({
    ...input.memory,
    onScratchFile: () => {
      if (!spilled) post({ type: "spilled" });
      spilled = true;
    },
  });
  // An input error names the row a one-process read of the file names.
  const read = await withFileRowNumbers(bytes, plan, plan.parts[0], async (firstRowIndex) => {
    const raw = await readDatasetPart(bytes, input.dataset.name, plan, 0, input.columns, {
      signal,
      firstRowIndex,
      memory,
    });
    // A shard's rows may fall in several parts: the disclosure minimum of federated clients
    // (methods.md §9) does not apply inside one analysis.
    const client = new LocalDigestClient(input.name, raw, {
      task: input.task,
      minimumShardRows: 1,
      // The coordinator judges a column that is not numeric in this part over all parts, from
      // each part's count of its numbers and other values.
      refuseUnencodable: false,
      countValueKinds: true,
      threads: input.threads,
      memory,
    });
    try {
      return { client, schema: await client.schema() };
    } catch (error) {
      await client.close();
      throw error;
    }
  });
  post({ type: "read", schema: read.schema });
  return read.client;
}

/** One question of the coordinator (stored-part-connection.ts), answered from the part's rows. */
async function answer(client: LocalDigestClient, kind: PartQuestionKind, question: unknown) {
  const { encoding, request } = question as { encoding: unknown; request?: unknown };
  const parsedEncoding = encodingSchema.parse(encoding);
  if (kind === "gram") return client.gram(parsedEncoding);
  if (kind === "evaluate") {
    return client.evaluate(parsedEncoding, evaluationRequestSchema.parse(request));
  }
  return client.gradients(parsedEncoding, measurementRequestSchema.parse(request));
}

const reading = new AbortController();
// Set by part-rows-thread.ts, the only code that starts this thread.
const client = readPart(workerData as PartThreadInput, reading.signal);
client.catch(report);
// Questions come one at a time; the chain keeps them in order all the same.
let answered: Promise<void> = Promise.resolve();
parentPort!.on("message", (request: PartThreadRequest) => {
  if (request.type === "close") {
    // A read still going stops at its next chunk; then the scratch files and threads go.
    reading.abort();
    void client
      .then((ready) => ready.close(), () => undefined)
      .finally(() => post({ type: "closed" }));
    return;
  }
  answered = answered.then(async () => {
    const ready = await client.catch(() => null);
    // The read's error is reported already.
    if (!ready) return;
    try {
      post({ type: "answer", id: request.id, answer: await answer(ready, request.kind, request.question) });
    } catch (error) {
      report(error);
    }
  });
});
