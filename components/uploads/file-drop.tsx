"use client";

import { useEffect, useRef, useState } from "react";
import { useDropzone, type Accept } from "react-dropzone";
import { Button } from "@/components/ui/button";
import type { DataFileSummary } from "@/db/queries/data-files";
import type { ActionResult } from "@/lib/actions/result";
import { uploadToStorage } from "@/lib/uploads/browser-upload";
import {
  FORMAT_RULES,
  KIND_LABELS,
  findUploadProblem,
  formatBytes,
  type DataFileKind,
} from "@/lib/uploads/file-rules";
import type { RegisteredFile } from "@/lib/uploads/register-upload";
import type { RegisterDataFileInput } from "@/lib/validation/upload";

type UploadState =
  | { phase: "idle" }
  | { phase: "uploading"; file: File; loaded: number }
  | { phase: "checking"; file: File }
  | { phase: "failed"; file: File; message: string; retryable: boolean };

/** Filters the file picker; the checks that decide are findUploadProblem's. */
const TABLE_PICKER_TYPES: Accept = {
  "text/csv": [".csv"],
  // Pickers match the last extension only, so ".csv.gz" is offered as ".gz".
  "application/gzip": [".gz"],
  "application/vnd.apache.parquet": [".parquet"],
};
const PICKER_TYPES: Record<DataFileKind, Accept> = {
  dataset: TABLE_PICKER_TYPES,
  layout: TABLE_PICKER_TYPES,
  weights: { "application/json": [".json"] },
};

/**
 * Drop or pick one file; it is checked here (type, size, empty) before any byte is sent, then
 * uploaded straight to storage with a progress bar and a cancel button, and registered with the
 * server, which answers with its preview. On failure the message says why and the file stays
 * selected for another try.
 */
export function FileDrop({
  workspaceId,
  kind,
  maxBytes,
  inputLabel,
  onRegistered,
  registerDataFile,
}: {
  workspaceId: string;
  /** The page's action that registers an uploaded object as a file of the workspace. */
  registerDataFile: (input: RegisterDataFileInput) => Promise<ActionResult<RegisteredFile>>;
  kind: DataFileKind;
  maxBytes: number;
  /** The accessible name of the file input, e.g. "Dataset file". */
  inputLabel: string;
  onRegistered(file: DataFileSummary): void;
}) {
  const [state, setState] = useState<UploadState>({ phase: "idle" });
  const [reused, setReused] = useState<string>();
  const cancelRef = useRef<AbortController | null>(null);
  const busy = state.phase === "uploading" || state.phase === "checking";

  // When the drop zone goes away (leaving the page, or choosing a shard column instead of a map),
  // the upload in flight stops instead of running on unseen.
  useEffect(() => () => cancelRef.current?.abort(), []);

  async function upload(file: File) {
    const problem = findUploadProblem(
      { name: file.name, size: file.size, contentType: file.type },
      kind,
      maxBytes,
    );
    if (problem) {
      // Sending the same file again cannot help; choosing another one can.
      setState({ phase: "failed", file, message: problem, retryable: false });
      return;
    }
    const controller = new AbortController();
    cancelRef.current = controller;
    setState({ phase: "uploading", file, loaded: 0 });
    try {
      const key = await uploadToStorage({
        workspaceId,
        file,
        kind,
        signal: controller.signal,
        onProgress: (loaded) => setState({ phase: "uploading", file, loaded }),
      });
      setState({ phase: "checking", file });
      const result = await registerDataFile({ key, name: file.name, kind });
      if (!result.ok) {
        setState({
          phase: "failed",
          file,
          message: result.fieldErrors.file ?? result.message,
          retryable: result.status >= 500,
        });
        return;
      }
      setState({ phase: "idle" });
      setReused(
        result.data.reused
          ? `"${file.name}" has the same contents as "${result.data.name}", already uploaded here: that file is chosen instead of a second copy.`
          : undefined,
      );
      onRegistered(result.data);
    } catch (error) {
      const cancelled = controller.signal.aborted;
      setState({
        phase: "failed",
        file,
        retryable: true,
        message: cancelled
          ? `The upload of "${file.name}" was cancelled.`
          : error instanceof Error
            ? error.message
            : "The upload failed. Please try again.",
      });
    } finally {
      if (cancelRef.current === controller) cancelRef.current = null;
    }
  }

  const { getRootProps, getInputProps, isDragActive } = useDropzone({
    accept: PICKER_TYPES[kind],
    multiple: false,
    disabled: busy,
    onDrop: (accepted, rejected) => {
      const file = accepted[0] ?? rejected[0]?.file;
      if (file) void upload(file);
    },
  });

  const rule = FORMAT_RULES[kind];
  return (
    <div className="space-y-3">
      <div
        {...getRootProps({
          className: `flex cursor-pointer flex-col items-center gap-1 rounded-lg border-2 border-dashed px-6 py-8 text-center transition-colors focus:outline-none focus-visible:ring-2 focus-visible:ring-indigo/40 ${
            isDragActive ? "border-indigo bg-indigo-soft/40" : "border-ink/20 bg-white"
          } ${busy ? "cursor-not-allowed opacity-60" : "hover:border-indigo/60"}`,
        })}
      >
        <input {...getInputProps({ "aria-label": inputLabel })} />
        <p className="text-sm font-medium">
          {isDragActive ? "Drop it here" : `Drop the ${KIND_LABELS[kind]} here, or click to choose`}
        </p>
        <p className="text-xs text-ink-soft">
          {rule.description}; up to {formatBytes(maxBytes)}
        </p>
      </div>
      {reused && state.phase === "idle" ? (
        <p role="status" className="rounded-md border border-ink/10 bg-white px-4 py-3 text-sm">
          {reused}
        </p>
      ) : null}
      <UploadStatus
        state={state}
        onCancel={() => cancelRef.current?.abort()}
        onRetry={(file) => void upload(file)}
      />
    </div>
  );
}

function UploadStatus({
  state,
  onCancel,
  onRetry,
}: {
  state: UploadState;
  onCancel(): void;
  onRetry(file: File): void;
}) {
  if (state.phase === "idle") return null;
  if (state.phase === "failed") {
    const { file } = state;
    return (
      <div
        role="alert"
        className="flex flex-wrap items-center gap-3 rounded-md border border-cadmium/40 bg-cadmium-soft px-4 py-3 text-sm"
      >
        <p className="min-w-0 flex-1">{state.message}</p>
        {state.retryable ? (
          <Button type="button" tone="quiet" onClick={() => onRetry(file)}>
            Try again
          </Button>
        ) : null}
      </div>
    );
  }
  const { file } = state;
  const percent =
    state.phase === "uploading" ? Math.min(100, Math.floor((state.loaded / file.size) * 100)) : 100;
  return (
    <div className="space-y-2 rounded-md border border-ink/10 bg-white px-4 py-3 text-sm">
      <div className="flex items-center gap-3">
        <p className="min-w-0 flex-1 truncate">
          {state.phase === "uploading"
            ? `Uploading ${file.name} — ${formatBytes(state.loaded)} of ${formatBytes(file.size)}`
            : `Checking ${file.name}…`}
        </p>
        {state.phase === "uploading" ? (
          <Button type="button" tone="quiet" onClick={onCancel}>
            Cancel upload
          </Button>
        ) : null}
      </div>
      <div
        role="progressbar"
        aria-label={`Upload of ${file.name}`}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={percent}
        className="h-2 overflow-hidden rounded-full bg-paper-deep"
      >
        <div className="h-full bg-indigo transition-[width]" style={{ width: `${percent}%` }} />
      </div>
    </div>
  );
}
