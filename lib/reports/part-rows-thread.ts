import { Worker } from "node:worker_threads";
import { AnalysisInputError, type SchemaDigest } from "@/lib/analysis";
import type {
  PartQuestionKind,
  PartThreadInput,
  PartThreadMessage,
  PartThreadRequest,
} from "./part-thread-protocol";

/** The wait for round 1's digest, beside the questions' waits (numbered from 0). */
const SCHEMA = -1;

/**
 * An analysis part's rows, read and kept in a thread of their own (part-thread.ts). Reading,
 * round 1's digest and encoding the rows are long synchronous computations on a large part (many
 * seconds each at millions of rows); in the thread they leave this thread free to send the run's
 * heartbeats — its own and, when this worker also coordinates the analysis, the coordinator's —
 * which would otherwise stop long enough for another worker to count the run as lost.
 *
 * `schema` resolves with round 1's digest once the part is read; `ask` answers one question of
 * the coordinator. Both reject with the engine's AnalysisInputError for bad input, with an Error
 * for anything internal, and with the signal's reason once `signal` is aborted.
 */
export class PartRowsThread {
  readonly schema: Promise<SchemaDigest>;
  private readonly thread: Worker;
  private readonly waiting = new Map<number, { resolve(answer: unknown): void; reject(error: unknown): void }>();
  private nextQuestion = 0;
  private failure: unknown = null;
  private closed: Promise<void> | null = null;

  constructor(
    input: PartThreadInput,
    private readonly hooks: {
      /** Rows went to a scratch file past the memory limit (called once, before the answer). */
      onSpill(): void;
      signal: AbortSignal;
    },
  ) {
    // An explicit empty execArgv: the thread needs none of the parent's flags (a test runner's,
    // say), and registers its own TypeScript loader.
    this.thread = new Worker(new URL("./part-thread-entry.mjs", import.meta.url), {
      workerData: input,
      execArgv: [],
    });
    let schemaRead!: { resolve(schema: SchemaDigest): void; reject(error: unknown): void };
    this.schema = new Promise((resolve, reject) => (schemaRead = { resolve, reject }));
    this.waiting.set(SCHEMA, {
      resolve: (schema) => schemaRead.resolve(schema as SchemaDigest),
      reject: (error) => schemaRead.reject(error),
    });
    this.thread.on("message", (message: PartThreadMessage) => this.receive(message));
    this.thread.on("error", (error) => this.fail(error));
    this.thread.on("exit", (code) =>
      this.fail(new Error(`part thread exited (code ${code}) without an answer`)),
    );
    const onAbort = () => this.fail(hooks.signal.reason);
    if (hooks.signal.aborted) onAbort();
    else hooks.signal.addEventListener("abort", onAbort, { once: true });
  }

  /** One question of the coordinator, answered from the part's rows. */
  ask(kind: PartQuestionKind, question: unknown): Promise<unknown> {
    if (this.failure !== null) return Promise.reject(this.failure);
    const id = this.nextQuestion++;
    return new Promise((resolve, reject) => {
      this.waiting.set(id, { resolve, reject });
      this.send({ type: "ask", id, kind, question });
    });
  }

  /** Gives back the part's scratch files and pass threads, then ends the thread (idempotent). */
  close(): Promise<void> {
    this.closed ??= new Promise<void>((resolve) => {
      if (this.thread.threadId === -1) return resolve();
      this.thread.once("exit", () => resolve());
      this.thread.on("message", (message: PartThreadMessage) => {
        if (message.type === "closed") void this.thread.terminate();
      });
      this.send({ type: "close" });
    });
    return this.closed;
  }

  private send(request: PartThreadRequest) {
    this.thread.postMessage(request);
  }

  private receive(message: PartThreadMessage) {
    switch (message.type) {
      case "read":
        return this.settle(SCHEMA, message.schema);
      case "spilled":
        return this.hooks.onSpill();
      case "answer":
        return this.settle(message.id, message.answer);
      case "input-error":
        return this.fail(new AnalysisInputError(message.problem, message.location));
      case "internal-error":
        return this.fail(new Error(`part thread: ${message.detail}`));
    }
  }

  private settle(id: number, answer: unknown) {
    this.waiting.get(id)?.resolve(answer);
    this.waiting.delete(id);
  }

  /** Every wait rejects with the first failure, and so does every later question. */
  private fail(error: unknown) {
    this.failure ??= error;
    for (const { reject } of this.waiting.values()) reject(this.failure);
    this.waiting.clear();
  }
}
