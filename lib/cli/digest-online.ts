import {
  AnalysisInputError,
  computeEncodingHash,
  encodingSchema,
  evaluationRequestSchema,
  LocalDigestClient,
  measurementRequestSchema,
  type DigestEncoding,
} from "../analysis";
import type { RawDataset } from "../analysis";
import type { ApiClient } from "./api-client";
import { ServerError } from "./api-client";

/** The key's client and its analysis, as GET /api/v1/digests/client answers. */
export type ClientAssignment = {
  client: string;
  analysisId: string;
  title: string;
  state: string;
  labelColumn: string;
  features: string[] | null;
  task: "classification" | "regression" | null;
  minimumShardRows: number;
};

type Work =
  | { kind: "evaluate" | "gram" | "gradients"; exchangeId: string; request: unknown }
  | { kind: "wait"; state: string }
  | { kind: "done"; reportId: string | null }
  | { kind: "failed"; message: string };

export interface OnlineClientRequest {
  /** The server, authenticated with the client key (`createApiClient(server, key)`). */
  api: Pick<ApiClient, "getJson" | "postJson">;
  /** Reads the client's rows once the analysis's label and features are known. */
  readRows: (assignment: ClientAssignment) => Promise<RawDataset>;
  /** Prints the round-1 digest and sends nothing. */
  dryRun?: boolean;
  /** Where the dry run's digest goes (stdout in the command). */
  print: (json: string) => void;
  /** Progress lines (stderr in the command). */
  log: (line: string) => void;
  /** Seconds the server may hold each long poll. */
  waitSeconds?: number;
  /** How long the server may stay unreachable before the client gives up (it rejoins until then). */
  reconnectLimitMs?: number;
  signal?: AbortSignal;
}

/** The analysis ended without a report (the server's message says why). */
export class FederatedAnalysisFailed extends Error {
  constructor(message: string) {
    super(message);
    this.name = "FederatedAnalysisFailed";
  }
}

const sleep = (ms: number) => new Promise((resolve) => setTimeout(resolve, ms));

/**
 * One client of a federated analysis, online (methods.md §9): sends round 1, waits for the
 * encoding, then answers whatever the coordinator asks — each evaluation of its fit, Σx̃x̃ᵀ, and
 * round 2 — until the analysis ends; returns the report id. Only counts and sums leave; the rows
 * stay in this process. A lost connection is retried (the server keeps the open question), so a
 * restarted client rejoins where it left off.
 */
export async function runOnlineClient(request: OnlineClientRequest): Promise<string | null> {
  const { log } = request;
  const server = resilient(request);
  const assignment = (await server.get("/api/v1/digests/client")) as ClientAssignment;
  log(`client "${assignment.client}" of "${assignment.title}" (${assignment.state})`);
  const raw = await request.readRows(assignment);
  const local = new LocalDigestClient(assignment.client, raw, {
    task: assignment.task ?? undefined,
    minimumShardRows: assignment.minimumShardRows,
  });
  try {
    const schema = await local.schema();
    if (request.dryRun) {
      request.print(`${JSON.stringify(schema, null, 2)}\n`);
      log(
        `dry run: round 1 above (${schema.shards.length} shards, ${raw.keptRows} rows) was not sent; later rounds send only sums at the points the coordinator chooses`,
      );
      return null;
    }
    const sent = (await server.post("/api/v1/digests/schema", schema)) as { repeated: boolean };
    log(
      `round 1 ${sent.repeated ? "was already accepted" : "sent"}: ${schema.shards.length} shards, ${raw.keptRows} rows`,
    );
    return await answerUntilEnd(server, local, request);
  } finally {
    await local.close();
  }
}

async function answerUntilEnd(
  server: ReturnType<typeof resilient>,
  local: LocalDigestClient,
  request: OnlineClientRequest,
): Promise<string | null> {
  const { log } = request;
  let encoding: DigestEncoding | null = null;
  let lastState = "";
  let evaluations = 0;
  const fetchEncoding = async () => {
    const fetched = encodingSchema.parse(await server.get("/api/v1/digests/encoding"));
    if (computeEncodingHash(fetched) !== fetched.hash) {
      throw new AnalysisInputError("the server's encoding does not match its own hash");
    }
    log(`encoding ${fetched.hash.slice(0, 12)}…: ${fetched.columns.length} encoded columns`);
    return fetched;
  };
  const encodingFor = async (hash: string) => {
    if (encoding?.hash !== hash) encoding = await fetchEncoding();
    return encoding;
  };
  for (;;) {
    request.signal?.throwIfAborted();
    const work = (await server.get(
      `/api/v1/digests/work?wait=${request.waitSeconds ?? 20}`,
    )) as Work;
    switch (work.kind) {
      case "wait":
        if (work.state !== lastState) log(`waiting: ${work.state}`);
        lastState = work.state;
        break;
      case "evaluate": {
        const asked = evaluationRequestSchema.parse(work.request);
        const sums = await local.evaluate(await encodingFor(asked.encodingHash), asked);
        await server.post(`/api/v1/digests/exchanges/${work.exchangeId}`, sums);
        evaluations += 1;
        if (evaluations === 1 || evaluations % 10 === 0)
          log(`fit: ${evaluations} evaluations answered`);
        break;
      }
      case "gram": {
        const { encodingHash } = work.request as { encodingHash: string };
        const gram = await local.gram(await encodingFor(encodingHash));
        await server.post(`/api/v1/digests/exchanges/${work.exchangeId}`, gram);
        log("fit: Σx̃x̃ᵀ sent");
        break;
      }
      case "gradients": {
        const asked = measurementRequestSchema.parse(work.request);
        const digest = await local.gradients(await encodingFor(asked.encodingHash), asked);
        await server.post("/api/v1/digests/gradients", digest);
        log(`round 2 sent: ${digest.shards.length} shards`);
        break;
      }
      case "done":
        log(`the analysis is done${work.reportId ? `: report ${work.reportId}` : ""}`);
        return work.reportId;
      case "failed":
        throw new FederatedAnalysisFailed(work.message);
    }
  }
}

/**
 * The server's API with lost connections retried: a network error or a 5xx answer is tried again
 * (backing off to 10 s) until the server has been unreachable for `reconnectLimitMs`. A refusal
 * (4xx) is the client's to read and ends the run.
 */
function resilient({ api, log, reconnectLimitMs = 15 * 60_000, signal }: OnlineClientRequest) {
  async function withRetry<T>(send: () => Promise<T>): Promise<T> {
    let since: number | null = null;
    let delay = 500;
    for (;;) {
      try {
        const answer = await send();
        if (since !== null) log("reconnected");
        return answer;
      } catch (error) {
        if (error instanceof ServerError && error.status < 500) throw error;
        since ??= Date.now();
        if (Date.now() - since >= reconnectLimitMs) throw error;
        if (delay === 500) log(`the server is unreachable (${(error as Error).message}); retrying`);
        signal?.throwIfAborted();
        await sleep(delay);
        delay = Math.min(10_000, delay * 2);
      }
    }
  }
  return {
    get: (path: string) => withRetry(() => api.getJson<unknown>(path)),
    post: (path: string, body: unknown) => withRetry(() => api.postJson<unknown>(path, body)),
  };
}
