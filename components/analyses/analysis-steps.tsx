"use client";

import { useEffect, useRef, useState } from "react";
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
import { useDatasetPreview } from "@/components/analyses/use-dataset-preview";
import { useFeatureChoice } from "@/components/analyses/use-feature-choice";
import type { DataFileSummary } from "@/db/queries/data-files";
import type { DataFilePreview } from "@/db/schema/analyses";
import { guessColumns } from "@/lib/uploads/guess-columns";
import { previewedShards } from "@/lib/validation/shard-count";

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
  const reading = useDatasetPreview(workspaceId, dataset, options);
  const columns = reading.preview?.columns ?? [];
  const columnNames = columns.map((column) => column.name);
  const usable = usableFeatures(columnNames, reservedColumns(values));
  const refreshFeatures = () => featureChoice.refreshFeatures(columnNames);

  const addFile = (kind: keyof WorkspaceFiles) => (file: DataFileSummary) =>
    setFiles((current) => ({
      ...current,
      [kind]: [file, ...current[kind].filter((other) => other.id !== file.id)],
    }));

  /**
   * Column roles for a preview's columns: a first dataset (or a re-read that loses the label) gets
   * guessed roles (a re-run or an earlier choice keeps its own); the layout follows what the file
   * holds: its shard column, or a partition map when it has none.
   */
  function followColumns(preview: DataFilePreview | null) {
    const names = (preview?.columns ?? []).map((column) => column.name);
    if (preview && !names.includes(getValues("options.labelColumn"))) {
      const guess = guessColumns(preview);
      setValue("options.labelColumn", guess.labelColumn);
      if (!names.includes(getValues("options.idColumn"))) {
        setValue("options.idColumn", guess.idColumn);
      }
      setValue("options.shardColumn", guess.shardColumn);
      setValue("layoutSource", guess.shardColumn ? "column" : "file");
    }
    featureChoice.followDataset(names);
  }

  function chooseDataset(file: DataFileSummary) {
    setChoice("datasetFileId", file.id);
    // A new file is read as detected at its upload until the user says otherwise.
    setValue("options.encoding", file.preview?.format?.encoding ?? "utf-8");
    setValue("options.delimiter", "");
    setValue("options.decimalMark", "");
    followColumns(file.preview);
  }

  // A re-read in other reading options can change the columns: their roles follow.
  const columnsKey = `${dataset?.id}:${columnNames.join("\u0000")}`;
  const followedKey = useRef(columnsKey);
  useEffect(() => {
    const sameDataset = followedKey.current.startsWith(`${dataset?.id}:`);
    if (followedKey.current !== columnsKey && sameDataset) followColumns(reading.preview);
    followedKey.current = columnsKey;
    // followColumns reads the form's current values itself; only a change of columns matters.
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [columnsKey]);

  const layoutFile = files.layouts.find((file) => file.id === values.layoutFileId);
  const layoutName =
    values.layoutSource === "column"
      ? options.shardColumn || "shard column"
      : (layoutFile?.name ?? "partition map");
  const shards =
    values.layoutSource === "column"
      ? options.shardColumn && dataset
        ? previewedShards(reading.preview, options.shardColumn, dataset.name)
        : undefined
      : layoutFile && previewedShards(layoutFile.preview, "shard", layoutFile.name);

  return (
    <>
      <DatasetStep
        workspaceId={workspaceId}
        maxBytes={maxBytes}
        datasets={files.datasets}
        dataset={dataset}
        preview={reading.preview}
        options={options}
        reading={reading}
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
          <PlanStep workspaceId={workspaceId} values={values} shards={shards} />
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
