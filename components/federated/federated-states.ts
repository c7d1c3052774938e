// The words for a federated analysis's state (db/schema/federated.ts), in one place for the list,
// the roster page's stepper and its headline.

import type { FederatedState } from "@/db/schema/federated";

export type { FederatedState };

export const STATE_LABELS: Record<FederatedState, string> = {
  "collecting-schemas": "Waiting for round 1",
  "encoding-ready": "Encoding ready",
  fitting: "Fitting the reference model",
  "collecting-gradients": "Waiting for round 2",
  merging: "Merging digests",
  done: "Report ready",
  failed: "Stopped",
};

/** The steps in order, each with what happens in it (the stepper on the roster page). */
export const STEPS: { states: FederatedState[]; title: string; detail: string }[] = [
  {
    states: ["collecting-schemas"],
    title: "Round 1",
    detail: "Each client sends its schema digest: rows, labels and column sums per shard.",
  },
  {
    states: ["encoding-ready", "fitting"],
    title: "Encoding and fit",
    detail: "The server fixes the pooled encoding and, for W*, fits it from the clients' sums.",
  },
  {
    states: ["collecting-gradients"],
    title: "Round 2",
    detail: "Each client sends its gradient digest at the reference point and along the path.",
  },
  {
    states: ["merging", "done"],
    title: "Report",
    detail: "The digests are merged into the report.",
  },
];

/** Whether the analysis still waits on clients or the coordinator (the page refreshes itself). */
export function isWaiting(state: string): boolean {
  return state !== "done" && state !== "failed";
}

export function stateLabel(state: string): string {
  return STATE_LABELS[state as FederatedState] ?? state;
}
