import "server-only";
import { findFederatedAnalysisById } from "@/db/queries/federated-analyses";
import { findOpenExchange } from "@/db/queries/federated-digests";
import { listenToFederatedClient } from "@/db/queries/federated-notices";
import type { ClientCaller } from "@/lib/auth/client-key-guard";
import { Doorbell } from "@/lib/doorbell";
import { RuleError } from "@/lib/errors";

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
  signal?: AbortSignal;
}

/** Looks again after this long without a notification, in case one was lost. */
const LOOK_AGAIN_MS = 1000;

/**
 * The client's long poll: the coordinator's oldest open question to it, as soon as there is one,
 * or the analysis's end; "wait" after `waitMs` without either. A client that lost its connection
 * and comes back finds the same open question here, so rejoining is just asking again. A new
 * question or a change of state wakes the wait at once (db/queries/federated-notices.ts).
 */
export async function waitForClientWork(
  sender: Sender,
  { waitMs = 20_000, signal = new AbortController().signal }: WaitOptions = {},
): Promise<ClientWork> {
  const deadline = Date.now() + waitMs;
  const news = new Doorbell();
  const stopListening = await listenToFederatedClient(
    { analysisId: sender.analysisId, clientId: sender.client.id },
    ["question", "state"],
    () => news.ring(),
  );
  try {
    for (;;) {
      const analysis = await findFederatedAnalysisById(sender.analysisId);
      if (!analysis) throw new RuleError(404, "There is no such federated analysis.");
      if (analysis.state === "done") return { kind: "done", reportId: analysis.reportId };
      if (analysis.state === "failed") {
        return { kind: "failed", message: analysis.failureMessage ?? "the analysis failed" };
      }
      const open = await findOpenExchange(sender.client.id);
      if (open) return { kind: open.kind, exchangeId: open.id, request: open.request };
      const left = deadline - Date.now();
      if (left <= 0 || signal.aborted) return { kind: "wait", state: analysis.state };
      await news.wait(Math.min(left, LOOK_AGAIN_MS), signal);
    }
  } finally {
    stopListening();
  }
}
