"use client";

import { useQuery, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { useState, useTransition } from "react";
import { ProgressBar } from "@/components/analyses/progress-bar";
import { Button, buttonClasses } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import type { ActionResult } from "@/lib/actions/result";
import { PLAN_STAGE_LABELS } from "@/lib/layout-plans/plan-progress";
import type { PlanStatusJson } from "@/lib/layout-plans/plan-status";
import { isFinished } from "@/lib/reports/analysis-status";

const POLL_MS = 1000;

const CANDIDATE_STATE: Record<PlanStatusJson["status"], string> = {
  queued: "Waiting",
  running: "Scoring",
  succeeded: "Scored",
  failed: "Failed",
  cancelled: "Cancelled",
};

async function fetchStatus(url: string): Promise<PlanStatusJson> {
  const response = await fetch(url, { cache: "no-store" });
  if (!response.ok) throw new Error(`The server answered ${response.status}.`);
  return response.json() as Promise<PlanStatusJson>;
}

/**
 * A plan's live state, polled every second until it ends: the shared reading and encoding,
 * then one bar per candidate with its state, a failed candidate's reason, and cancel.
 */
export function PlanProgressPanel({
  workspaceId,
  planId,
  initial,
  canRun,
  cancelPlan,
}: {
  workspaceId: string;
  planId: string;
  initial: PlanStatusJson;
  canRun: boolean;
  /** The route's cancel action, bound to this plan. */
  cancelPlan: () => Promise<ActionResult>;
}) {
  const queryKey = ["layout-plan-status", workspaceId, planId];
  const queryClient = useQueryClient();
  const { data, error } = useQuery({
    queryKey,
    queryFn: () => fetchStatus(`/api/workspaces/${workspaceId}/layout-plans/${planId}`),
    initialData: initial,
    refetchInterval: (query) =>
      query.state.data && isFinished(query.state.data.status) ? false : POLL_MS,
  });
  const [cancelError, setCancelError] = useState<string>();
  const [cancelling, startCancelling] = useTransition();
  const cancel = () => {
    setCancelError(undefined);
    startCancelling(async () => {
      const result = await cancelPlan();
      if (!result.ok) setCancelError(result.message);
      await queryClient.invalidateQueries({ queryKey });
    });
  };

  const ended = isFinished(data.status);
  const scored = data.candidates.filter((candidate) => candidate.status === "succeeded").length;
  const sharedDone = data.candidates.some((candidate) => candidate.status !== "queued");
  const headline = {
    queued: "Waiting for a worker",
    running:
      !sharedDone && data.stage
        ? (PLAN_STAGE_LABELS[data.stage] ?? "Preparing")
        : `Scoring candidates: ${scored} of ${data.candidates.length} done`,
    succeeded: `Finished: ${scored} of ${data.candidates.length} candidates scored`,
    failed: "Stopped: the plan could not finish",
    cancelled: `Cancelled: ${scored} of ${data.candidates.length} candidates scored`,
  }[data.status];
  const compareUrl = `/w/${workspaceId}/layouts/${planId}/compare`;

  return (
    <section aria-labelledby="plan-state" className="space-y-6">
      <div className="space-y-4 rounded-lg border border-ink/10 bg-white p-6">
        <h2 id="plan-state" className="text-lg font-semibold" aria-live="polite">
          {headline}
        </h2>
        <div className="space-y-1">
          <p className="text-sm text-ink-soft">
            Read and encode once for every candidate
            {data.stage && !sharedDone ? ` — ${PLAN_STAGE_LABELS[data.stage] ?? data.stage}` : ""}
          </p>
          <ProgressBar
            value={sharedDone || data.status === "succeeded" ? 1 : sharedFraction(data)}
            label="Reading and encoding"
          />
        </div>
        <ol className="space-y-3" aria-label="Candidates">
          {data.candidates.map((candidate) => (
            <li key={candidate.ordinal} className="space-y-1">
              <div className="flex flex-wrap items-baseline justify-between gap-2 text-sm">
                <span className="font-mono font-medium">{candidate.name}</span>
                <span
                  className={
                    candidate.status === "failed" ? "text-cadmium" : "text-ink-soft tabular-nums"
                  }
                  data-testid={`candidate-state-${candidate.name}`}
                >
                  {CANDIDATE_STATE[candidate.status]}
                  {candidate.status === "running"
                    ? ` · ${Math.round(candidate.fraction * 100)} %`
                    : ""}
                </span>
              </div>
              <ProgressBar
                value={candidate.status === "succeeded" ? 1 : candidate.fraction}
                label={`Progress of ${candidate.name}`}
              />
              {candidate.status === "failed" && candidate.failureMessage ? (
                <p className="text-sm break-words text-ink-soft">{candidate.failureMessage}</p>
              ) : null}
            </li>
          ))}
        </ol>
        {!ended && canRun ? (
          <div className="flex items-center gap-3 pt-2">
            <Button type="button" tone="danger" onClick={cancel} disabled={cancelling}>
              {cancelling ? "Cancelling…" : "Cancel the plan"}
            </Button>
            <span className="text-xs text-ink-soft">Candidates already scored are kept.</span>
          </div>
        ) : null}
        {cancelError ? <Notice tone="error">{cancelError}</Notice> : null}
      </div>
      {error && !ended ? (
        <Notice tone="info">Lost contact with the server ({error.message}); still trying…</Notice>
      ) : null}
      {data.status === "failed" && data.failureMessage ? (
        <Notice tone="error">
          <p className="font-medium">What went wrong</p>
          <p className="mt-1 break-words">{data.failureMessage}</p>
        </Notice>
      ) : null}
      {scored > 0 ? (
        <Link className={buttonClasses(ended ? "primary" : "quiet")} href={compareUrl}>
          {ended ? "Compare the candidates" : "Compare the candidates scored so far"}
        </Link>
      ) : null}
    </section>
  );
}

/** The shared stages as one fraction: reading, then encoding. */
function sharedFraction(data: PlanStatusJson): number {
  const order = ["reading", "encoding"];
  const index = data.stage ? order.indexOf(data.stage) : -1;
  return index < 0 ? 0 : (index + data.fraction) / order.length;
}
