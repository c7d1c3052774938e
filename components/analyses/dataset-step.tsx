"use client";

import { useFieldError } from "@/components/analyses/analysis-form-hooks";
import type { AnalysisFormValues } from "@/components/analyses/analysis-form-schema";
import { FileChoice } from "@/components/analyses/file-choice";
import { FormStep } from "@/components/analyses/form-controls";
import { ReadingFieldset } from "@/components/analyses/reading-fieldset";
import { PreviewTable } from "@/components/uploads/preview-table";
import type { DataFileSummary } from "@/db/queries/data-files";
import type { DataFilePreview } from "@/db/schema/analyses";

/**
 * Step 1: upload or pick the dataset, say how its text is read, and preview the chosen one as the
 * run will read it.
 */
export function DatasetStep({
  workspaceId,
  maxBytes,
  datasets,
  dataset,
  preview,
  options,
  reading,
  onChoose,
  onUploaded,
}: {
  workspaceId: string;
  maxBytes: number;
  datasets: DataFileSummary[];
  dataset: DataFileSummary | undefined;
  /** The chosen dataset's preview in the chosen reading options. */
  preview: DataFilePreview | null;
  options: AnalysisFormValues["options"];
  /** Whether the preview is being read again, and why that failed. */
  reading: { reading: boolean; error: string | undefined };
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
      {dataset?.preview?.format ? (
        <ReadingFieldset
          detected={dataset.preview.format}
          values={options}
          reading={reading.reading}
          error={reading.error}
        />
      ) : null}
      {dataset && preview ? <PreviewTable name={dataset.name} preview={preview} /> : null}
    </FormStep>
  );
}
