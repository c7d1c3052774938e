"use client";

import { useState } from "react";
import { useAnalysisFormActions } from "@/components/analyses/analysis-form-actions";
import { FileDrop } from "@/components/uploads/file-drop";
import { ConfirmActionButton } from "@/components/ui/confirm-action-button";
import type { DataFileSummary } from "@/db/queries/data-files";
import { formatBytes, type DataFileKind } from "@/lib/uploads/file-rules";

// A fixed time zone keeps the server's rendering and the browser's in agreement.
const dateFormat = new Intl.DateTimeFormat("en", {
  dateStyle: "medium",
  timeStyle: "short",
  timeZone: "UTC",
});

/**
 * One input file of an analysis: upload a new one, or pick one already uploaded to this workspace
 * (newest first). A new upload is chosen as soon as it is registered. A file no analysis reads can
 * be deleted from the list.
 */
export function FileChoice({
  workspaceId,
  kind,
  maxBytes,
  files,
  selectedId,
  onSelect,
  onRegistered,
  inputLabel,
  groupLabel,
  error,
}: {
  workspaceId: string;
  kind: DataFileKind;
  maxBytes: number;
  files: DataFileSummary[];
  selectedId: string;
  onSelect(fileId: string): void;
  onRegistered(file: DataFileSummary): void;
  /** Accessible name of the upload input, e.g. "Dataset file". */
  inputLabel: string;
  /** Heading of the list of uploaded files, e.g. "Datasets in this workspace". */
  groupLabel: string;
  error?: string;
}) {
  const { registerDataFile, deleteDataFile } = useAnalysisFormActions();
  const errorId = `${kind}-choice-error`;
  const [deletedIds, setDeletedIds] = useState<string[]>([]);
  const shown = files.filter((file) => !deletedIds.includes(file.id));
  return (
    <div className="grid gap-4 md:grid-cols-2">
      <FileDrop
        workspaceId={workspaceId}
        kind={kind}
        maxBytes={maxBytes}
        inputLabel={inputLabel}
        onRegistered={onRegistered}
        registerDataFile={registerDataFile}
      />
      <fieldset
        className="min-w-0 space-y-2"
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? errorId : undefined}
      >
        <legend className="text-sm font-medium">{groupLabel}</legend>
        {shown.length === 0 ? (
          <p className="rounded-md border border-dashed border-ink/15 px-4 py-3 text-sm text-ink-soft">
            None yet: the first one you upload appears here.
          </p>
        ) : (
          <ul className="max-h-56 space-y-1 overflow-auto pr-1">
            {shown.map((file) => (
              <li key={file.id} className="flex items-start gap-1">
                <label className="flex min-w-0 flex-1 cursor-pointer items-start gap-3 rounded-md border border-ink/10 bg-white px-3 py-2 text-sm has-checked:border-indigo has-checked:bg-indigo-soft/40">
                  <input
                    type="radio"
                    name={`${kind}-choice`}
                    value={file.id}
                    checked={selectedId === file.id}
                    onChange={() => onSelect(file.id)}
                    className="mt-1 accent-indigo"
                  />
                  <span className="min-w-0">
                    <span className="block truncate font-medium">{file.name}</span>
                    <span className="block text-xs text-ink-soft">
                      {formatBytes(file.sizeBytes)} · {file.preview?.columns.length ?? 0} columns ·
                      uploaded {dateFormat.format(new Date(file.createdAt))} UTC
                      {file.analysisCount > 0
                        ? ` · read by ${file.analysisCount === 1 ? "1 analysis" : `${file.analysisCount} analyses`}`
                        : ""}
                    </span>
                  </span>
                </label>
                {file.analysisCount === 0 ? (
                  <ConfirmActionButton
                    label="Delete"
                    confirmation={`Delete "${file.name}"? No analysis reads it; it is removed from storage too.`}
                    action={() => deleteDataFile(file.id)}
                    onDone={() => {
                      setDeletedIds((ids) => [...ids, file.id]);
                      if (selectedId === file.id) onSelect("");
                    }}
                  />
                ) : null}
              </li>
            ))}
          </ul>
        )}
        {error ? (
          <p id={errorId} role="alert" className="text-xs font-medium text-cadmium">
            {error}
          </p>
        ) : null}
      </fieldset>
    </div>
  );
}
