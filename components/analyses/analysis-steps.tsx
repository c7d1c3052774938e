"use client";

import { useState } from "react";
import { useFormContext, useWatch } from "react-hook-form";
import { useSetChoice } from "@/components/analyses/analysis-form-hooks";
import {
  reservedColumns,
  usableFeatures,
  type AnalysisFormValues,
} from "@/components/analyses/analysis-form-schema";
import { ColumnsStep } from "@/components/analyses/columns-step";
import { DatasetStep } from "@/components/analyses/dataset-step";
import { LayoutStep } from "@/components/analyses/layout-step";
import { PlanStep } from "@/components/analyses/plan-step";
import { ReferenceStep } from "@/components/analyses/reference-step";
import { StartSection } from "@/components/analyses/start-section";
import { useFeatureChoice } from "@/components/analyses/use-feature-choice";
import type { DataFileSummary } from "@/db/queries/data-files";
import { guessColumns } from "@/lib/uploads/guess-columns";

export interface WorkspaceFiles {
  datasets: DataFileSummary[];
  layouts: DataFileSummary[];
  weights: DataFileSummary[];
}

/**
 * The form's steps in order: the dataset first, the rest once there is one to map. Holds the
 * workspace's files (uploads join them) and keeps the features in step with the column choices.
 */
export function AnalysisSteps({
  workspaceId,
  maxBytes,
  initialFiles,
  featuresInitiallyChosen,
}: {
  workspaceId: string;
  maxBytes: number;
  initialFiles: WorkspaceFiles;
  featuresInitiallyChosen: boolean;
}) {
  const { control, getValues, setValue } = useFormContext<AnalysisFormValues>();
  const values = useWatch({ control }) as AnalysisFormValues;
  const { options } = values;
  const setChoice = useSetChoice();
  const featureChoice = useFeatureChoice(featuresInitiallyChosen);
  const [files, setFiles] = useState(initialFiles);

  const dataset = files.datasets.find((file) => file.id === values.datasetFileId);
  const columns = dataset?.preview?.columns ?? [];
  const columnNames = columns.map((column) => column.name);
  const usable = usableFeatures(columnNames, reservedColumns(values));
  const refreshFeatures = () => featureChoice.refreshFeatures(columnNames);

  const addFile = (kind: keyof WorkspaceFiles) => (file: DataFileSummary) =>
    setFiles((current) => ({
      ...current,
      [kind]: [file, ...current[kind].filter((other) => other.id !== file.id)],
    }));

  function chooseDataset(file: DataFileSummary) {
    setChoice("datasetFileId", file.id);
    const names = (file.preview?.columns ?? []).map((column) => column.name);
    // A first dataset gets guessed roles (a re-run or an earlier choice keeps its own); the layout
    // follows what the file holds: its shard column, or a partition map when it has none.
    if (file.preview && !getValues("options.labelColumn")) {
      const guess = guessColumns(file.preview);
      setValue("options.labelColumn", guess.labelColumn);
      if (!getValues("options.idColumn")) setValue("options.idColumn", guess.idColumn);
      setValue("options.shardColumn", guess.shardColumn);
      setValue("layoutSource", guess.shardColumn ? "column" : "file");
    }
    featureChoice.followDataset(names);
  }

  const layoutName =
    values.layoutSource === "column"
      ? options.shardColumn || "shard column"
      : (files.layouts.find((file) => file.id === values.layoutFileId)?.name ?? "partition map");

  return (
    <>
      <DatasetStep
        workspaceId={workspaceId}
        maxBytes={maxBytes}
        datasets={files.datasets}
        dataset={dataset}
        onChoose={chooseDataset}
        onUploaded={addFile("datasets")}
      />
      {dataset ? (
        <>
          <LayoutStep
            workspaceId={workspaceId}
            maxBytes={maxBytes}
            values={values}
            columns={columns}
            layouts={files.layouts}
            onUploaded={addFile("layouts")}
            onColumnChange={refreshFeatures}
          />
          <ColumnsStep
            columns={columns}
            labelColumn={options.labelColumn}
            usable={usable}
            chosenCount={options.features.length}
            onColumnChange={refreshFeatures}
            onChooseAll={() => featureChoice.chooseAll(usable)}
            onChooseNone={featureChoice.chooseNone}
            onPick={featureChoice.markChosen}
          />
          <ReferenceStep
            workspaceId={workspaceId}
            maxBytes={maxBytes}
            usesWeightsFile={values.referenceSource === "weights"}
            weights={files.weights}
            onUploaded={addFile("weights")}
          />
          <PlanStep workspaceId={workspaceId} values={values} />
          <StartSection defaultTitle={`${dataset.name} · ${layoutName}`} />
        </>
      ) : (
        <p className="rounded-lg border border-dashed border-ink/15 px-5 py-4 text-sm text-ink-soft">
          Upload or choose a dataset to map its columns and state your plan.
        </p>
      )}
    </>
  );
}
