import "server-only";
import { findFederatedAnalysisById } from "@/db/queries/federated-analyses";
import { findOpenExchange } from "@/db/queries/federated-digests";
import type { ClientCaller } from "@/lib/auth/client-key-guard";
import { RuleError } from "@/lib/errors";
import { pause } from "@/lib/pause";

type Sender = Pick<ClientCaller, "analysisId" | "client">;

/** What a connected client is to do next. */
export type ClientWork =
  /** Answer this question of the coordinator (exchange kinds: evaluate, gram, gradients). */
  | { kind: "evaluate" | "gram" | "gradients"; exchangeId: string; request: unknown }
  /** Nothing yet: ask again (the analysis's state says what it waits for). */
  | { kind: "wait"; state: string }
  | { kind: "done"; reportId: string | null }
  | { kind: "failed"; message: string };

export interface WaitOptions {
  /** How long to hold the request open before answering "wait" (a long poll). */
  waitMs?: number;
  pollMs?: number;
  signal?: AbortSignal;
}

/**
 * The client's long poll: the coordinator's oldest open question to it, as soon as there is one,
 * or the analysis's end; "wait" after `waitMs` without either. A client that lost its connection
 * and comes back finds the same open question here, so rejoining is just asking again.
 */
export async function waitForClientWork(
  sender: Sender,
  { waitMs = 20_000, pollMs = 100, signal }: WaitOptions = {},
): Promise<ClientWork> {
  const deadline = Date.now() + waitMs;
  for (;;) {
    const analysis = await findFederatedAnalysisById(sender.analysisId);
    if (!analysis) throw new RuleError(404, "There is no such federated analysis.");
    if (analysis.state === "done") return { kind: "done", reportId: analysis.reportId };
    if (analysis.state === "failed") {
      return { kind: "failed", message: analysis.failureMessage ?? "the analysis failed" };
    }
    const open = await findOpenExchange(sender.client.id);
    if (open) return { kind: open.kind, exchangeId: open.id, request: open.request };
    if (Date.now() >= deadline || signal?.aborted) return { kind: "wait", state: analysis.state };
    await pause(pollMs, signal ?? new AbortController().signal);
  }
}
