"use client";

import { useQuery, useQueryClient } from "@tanstack/react-query";
import Link from "next/link";
import { useRouter } from "next/navigation";
import { useEffect, useRef, useState, useTransition } from "react";
import { Button, buttonClasses } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import {
  interruptionNotice,
  isFinished,
  overallProgress,
  SIMULATION_STAGE_LABEL,
  STAGE_LABELS,
  type AnalysisStatusJson,
} from "@/lib/reports/analysis-status";
import { ProgressBar } from "./progress-bar";
import { ProgressStages } from "./progress-stages";
import { SimulationProgressLine } from "./simulation-progress-line";
import type { ActionResult } from "@/lib/actions/result";

const POLL_MS = 1000;

async function fetchStatus(url: string): Promise<AnalysisStatusJson> {
  const response = await fetch(url, { cache: "no-store" });
  if (!response.ok) {
    const body = (await response.json().catch(() => null)) as {
      error?: { message?: string };
    } | null;
    throw new Error(body?.error?.message ?? `The server answered ${response.status}.`);
  }
  return response.json() as Promise<AnalysisStatusJson>;
}

function formatTime(iso: string | null): string | null {
  return iso ? new Date(iso).toLocaleTimeString() : null;
}

function formatDuration(fromIso: string, toIso: string): string {
  const seconds = Math.max(0, (Date.parse(toIso) - Date.parse(fromIso)) / 1000);
  return seconds < 90 ? `${seconds.toFixed(1)} s` : `${Math.round(seconds / 60)} min`;
}

/**
 * The live state of one analysis: polled every second until it ends. When it succeeds while
 * being watched, the browser moves on to the report; opened later, the page links to it.
 */
export function ProgressPanel({
  workspaceId,
  analysisId,
  initial,
  canRun,
  cancelAnalysis,
}: {
  workspaceId: string;
  analysisId: string;
  initial: AnalysisStatusJson;
  /** The route's cancel action, bound to this analysis. */
  cancelAnalysis: () => Promise<ActionResult>;
  /** Owners and analysts may cancel and run again; reviewers only watch. */
  canRun: boolean;
}) {
  const statusUrl = `/api/workspaces/${workspaceId}/analyses/${analysisId}`;
  const queryKey = ["analysis-status", workspaceId, analysisId];
  const queryClient = useQueryClient();
  const { data, error } = useQuery({
    queryKey,
    queryFn: () => fetchStatus(statusUrl),
    initialData: initial,
    refetchInterval: (query) =>
      query.state.data && isFinished(query.state.data.status) ? false : POLL_MS,
  });
  const router = useRouter();
  const reportUrl = data.reportId ? `/w/${workspaceId}/reports/${data.reportId}` : null;
  const rerunUrl = `/w/${workspaceId}/analyses/new?from=${analysisId}`;

  const watchedLive = useRef(!isFinished(initial.status));
  useEffect(() => {
    if (watchedLive.current && data.status === "succeeded" && reportUrl) router.push(reportUrl);
  }, [data.status, reportUrl, router]);

  const [cancelError, setCancelError] = useState<string>();
  const [cancelling, startCancelling] = useTransition();
  const cancel = () => {
    setCancelError(undefined);
    startCancelling(async () => {
      const result = await cancelAnalysis();
      if (!result.ok) setCancelError(result.message);
      await queryClient.invalidateQueries({ queryKey });
    });
  };

  const finished = isFinished(data.status);
  const notice = interruptionNotice(data, (iso) => new Date(iso).toLocaleTimeString());
  const progress = overallProgress(data);
  const headline = {
    queued: data.attempts > 0 ? "Waiting to try again" : "Waiting for a worker",
    running: data.simulation
      ? SIMULATION_STAGE_LABEL
      : data.stage
        ? STAGE_LABELS[data.stage]
        : "Starting",
    succeeded: "Finished",
    failed: "Stopped: the analysis could not finish",
    cancelled: "Cancelled",
  }[data.status];
  const started = formatTime(data.startedAt);

  return (
    <section aria-labelledby="run-state" className="space-y-6">
      <div className="space-y-3 rounded-lg border border-ink/10 bg-white p-6">
        <div className="flex flex-wrap items-baseline justify-between gap-2">
          <h2 id="run-state" className="text-lg font-semibold" aria-live="polite">
            {headline}
          </h2>
          <p className="text-sm text-ink-soft tabular-nums">
            {started ? `Started ${started}` : "Not started yet"}
            {data.attempts > 1 ? ` · attempt ${data.attempts}` : ""}
            {data.startedAt && data.finishedAt
              ? ` · took ${formatDuration(data.startedAt, data.finishedAt)}`
              : ""}
          </p>
        </div>
        <ProgressBar value={progress} label="Progress of the analysis" />
        <ProgressStages
          stage={data.stage}
          fraction={data.fraction}
          simulationFraction={data.simulates ? (data.simulation?.fraction ?? null) : undefined}
          allDone={data.status === "succeeded"}
          halted={data.status === "failed" || data.status === "cancelled"}
        />
        {data.status === "running" && data.simulation ? (
          <SimulationProgressLine progress={data.simulation} />
        ) : null}
        {!finished && canRun ? (
          <div className="flex items-center gap-3 pt-2">
            <Button type="button" tone="danger" onClick={cancel} disabled={cancelling}>
              {cancelling ? "Cancelling…" : "Cancel the analysis"}
            </Button>
            <span className="text-xs text-ink-soft">Your files are kept either way.</span>
          </div>
        ) : null}
        {cancelError ? <Notice tone="error">{cancelError}</Notice> : null}
      </div>

      {error && !finished ? (
        <Notice tone="info">Lost contact with the server ({error.message}); still trying…</Notice>
      ) : null}
      {notice ? <Notice tone="info">{notice}</Notice> : null}
      {data.status === "queued" && data.failureMessage ? (
        <Notice tone="info">{data.failureMessage}</Notice>
      ) : null}
      {data.status === "succeeded" && reportUrl ? (
        <Notice tone="success">
          The report is ready.{" "}
          <Link className="font-medium underline" href={reportUrl}>
            Open the report
          </Link>
        </Notice>
      ) : null}
      {data.status === "failed" ? (
        <div className="space-y-3">
          <Notice tone="error">
            <p className="font-medium">What went wrong</p>
            <p className="mt-1 break-words">{data.failureMessage}</p>
          </Notice>
          {canRun ? (
            <Link className={buttonClasses("primary")} href={rerunUrl}>
              Fix and run again
            </Link>
          ) : null}
          <p className="text-sm text-ink-soft">
            The uploaded files are kept, so only what needs fixing has to change.
          </p>
        </div>
      ) : null}
      {data.status === "cancelled" ? (
        <div className="space-y-3">
          <Notice tone="info">This analysis was cancelled; no report was stored.</Notice>
          {canRun ? (
            <Link className={buttonClasses("quiet")} href={rerunUrl}>
              Run it again
            </Link>
          ) : null}
        </div>
      ) : null}
    </section>
  );
}
