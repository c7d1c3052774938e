"use client";

import { useFieldError } from "@/components/analyses/analysis-form-hooks";
import { FileChoice } from "@/components/analyses/file-choice";
import { FormStep } from "@/components/analyses/form-controls";
import { PreviewTable } from "@/components/uploads/preview-table";
import type { DataFileSummary } from "@/db/queries/data-files";

/** Step 1: upload or pick the dataset, and preview the chosen one. */
export function DatasetStep({
  workspaceId,
  maxBytes,
  datasets,
  dataset,
  onChoose,
  onUploaded,
}: {
  workspaceId: string;
  maxBytes: number;
  datasets: DataFileSummary[];
  dataset: DataFileSummary | undefined;
  onChoose(file: DataFileSummary): void;
  onUploaded(file: DataFileSummary): void;
}) {
  const error = useFieldError("datasetFileId");
  return (
    <FormStep
      number={1}
      title="Dataset"
      intro="A CSV with a header row: a label column, feature columns, optionally an id and a shard column."
    >
      <FileChoice
        workspaceId={workspaceId}
        kind="dataset"
        maxBytes={maxBytes}
        files={datasets}
        selectedId={dataset?.id ?? ""}
        onSelect={(id) => {
          const file = datasets.find((candidate) => candidate.id === id);
          if (file) onChoose(file);
        }}
        onRegistered={(file) => {
          onUploaded(file);
          onChoose(file);
        }}
        inputLabel="Dataset file"
        groupLabel="Datasets in this workspace"
        error={error}
      />
      {dataset?.preview ? <PreviewTable name={dataset.name} preview={dataset.preview} /> : null}
    </FormStep>
  );
}
