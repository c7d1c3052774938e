"use client";

import { zodResolver } from "@hookform/resolvers/zod";
import { keepPreviousData, useQuery } from "@tanstack/react-query";
import { useRouter } from "next/navigation";
import { useState } from "react";
import { useForm, useWatch, type FieldPath } from "react-hook-form";
import {
  estimateSimulation,
  startAnalysis,
} from "@/app/(workspace)/w/[workspaceId]/analyses/actions";
import { FileChoice } from "@/components/analyses/file-choice";
import { SimulationCost } from "@/components/analyses/simulation-cost";
import {
  ChoiceOption,
  FormStep,
  InputField,
  SelectField,
} from "@/components/analyses/form-controls";
import { FieldMessage } from "@/components/ui/field-parts";
import {
  analysisFormSchema,
  reservedColumns,
  toStartAnalysisInput,
  usableFeatures,
  withDefaultFeatures,
  type AnalysisFormValues,
} from "@/components/analyses/analysis-form-schema";
import { PreviewTable } from "@/components/uploads/preview-table";
import { Button } from "@/components/ui/button";
import { Notice } from "@/components/ui/notice";
import type { DataFileSummary } from "@/db/queries/data-files";
import { detectTask } from "@/lib/uploads/preview-task";

export interface WorkspaceFiles {
  datasets: DataFileSummary[];
  layouts: DataFileSummary[];
  weights: DataFileSummary[];
}

/** Every field the server may name in its field errors, by its request path. */
const FIELD_PATHS = new Set<string>([
  "title",
  "datasetFileId",
  "layoutFileId",
  "weightsFileId",
  "options.labelColumn",
  "options.idColumn",
  "options.shardColumn",
  "options.features",
  "options.task",
  "options.lambda",
  "options.participants",
  "options.localSteps",
  "options.rounds",
  "options.batchSize",
  "options.simulate",
  "options.simulate.seeds",
]);

/**
 * The new-analysis form: the dataset, where the shards come from, the column mapping, the
 * reference model and the training plan, in one form whose values survive every failed submit.
 */
export function AnalysisForm({
  workspaceId,
  maxBytes,
  initialFiles,
  initialValues,
}: {
  workspaceId: string;
  maxBytes: number;
  initialFiles: WorkspaceFiles;
  initialValues: AnalysisFormValues;
}) {
  const router = useRouter();
  const [files, setFiles] = useState(initialFiles);
  const [notice, setNotice] = useState<string>();
  const form = useForm<AnalysisFormValues>({
    resolver: zodResolver(analysisFormSchema),
    defaultValues: withDefaultFeatures(
      initialValues,
      (
        initialFiles.datasets.find((file) => file.id === initialValues.datasetFileId)?.preview
          ?.columns ?? []
      ).map((column) => column.name),
    ),
  });
  const { register, control, setValue, getValues, getFieldState, setError, formState } = form;
  // Features follow the label/id/shard choice until the user picks them (or a re-run names them).
  const [featuresChosen, setFeaturesChosen] = useState(initialValues.options.features.length > 0);

  const values = useWatch({ control }) as AnalysisFormValues;
  const { options } = values;
  const dataset = files.datasets.find((file) => file.id === values.datasetFileId);
  const columns = dataset?.preview?.columns ?? [];
  const columnNames = columns.map((column) => column.name);

  const errorOf = (path: FieldPath<AnalysisFormValues>) =>
    getFieldState(path, formState).error?.message;
  const revalidate = { shouldValidate: formState.isSubmitted, shouldDirty: true };

  /**
   * Keeps the features in step with the other column choices: every usable column while the user
   * has not picked features, and never the label, id or shard column.
   */
  function refreshFeatures(names: string[], chosen = featuresChosen) {
    const usable = usableFeatures(names, reservedColumns(getValues()));
    const current = getValues("options.features");
    setValue(
      "options.features",
      chosen ? current.filter((name) => usable.includes(name)) : usable,
      revalidate,
    );
  }

  /** A different dataset keeps only the column choices it also has. */
  function chooseDataset(file: DataFileSummary) {
    const names = (file.preview?.columns ?? []).map((column) => column.name);
    setValue("datasetFileId", file.id, revalidate);
    for (const path of [
      "options.labelColumn",
      "options.idColumn",
      "options.shardColumn",
    ] as const) {
      if (!names.includes(getValues(path))) setValue(path, "");
    }
    const keepsFeatures =
      featuresChosen && getValues("options.features").some((name) => names.includes(name));
    setFeaturesChosen(keepsFeatures);
    refreshFeatures(names, keepsFeatures);
  }

  const columnChoice = { onChange: () => refreshFeatures(columnNames) };

  function addFile(kind: keyof WorkspaceFiles, file: DataFileSummary) {
    setFiles((current) => ({
      ...current,
      [kind]: [file, ...current[kind].filter((other) => other.id !== file.id)],
    }));
  }

  const submit = form.handleSubmit(async (formValues) => {
    setNotice(undefined);
    const result = await startAnalysis(workspaceId, toStartAnalysisInput(formValues));
    if (result.ok) {
      router.push(`/w/${workspaceId}/analyses/${result.data.analysisId}`);
      return;
    }
    const unplaced: string[] = [];
    for (const [path, message] of Object.entries(result.fieldErrors)) {
      if (FIELD_PATHS.has(path)) setError(path as FieldPath<AnalysisFormValues>, { message });
      else unplaced.push(message);
    }
    const placed = Object.keys(result.fieldErrors).length > unplaced.length;
    setNotice(
      unplaced.length > 0
        ? unplaced.join(" ")
        : placed
          ? "Some choices need attention; see the marked fields."
          : result.message,
    );
  });

  const labelColumn = columns.find((column) => column.name === options.labelColumn);
  const detectedTask = labelColumn ? detectTask(labelColumn) : undefined;
  const shardColumn = columns.find((column) => column.name === options.shardColumn);
  const usable = usableFeatures(columnNames, reservedColumns(values));
  const features = register("options.features", { onChange: () => setFeaturesChosen(true) });
  // The server words the estimate from the files' previews (the engine's simulation module runs
  // threads and stays out of the browser); the last estimate stays up while the next one loads.
  const estimateRequest = options.simulate.enabled ? toStartAnalysisInput(values) : null;
  const simulationEstimate = useQuery({
    queryKey: ["simulation-estimate", workspaceId, estimateRequest],
    queryFn: async () => {
      const result = await estimateSimulation(workspaceId, estimateRequest!);
      if (!result.ok) throw new Error(result.message);
      return result.data;
    },
    enabled: estimateRequest !== null,
    placeholderData: keepPreviousData,
    staleTime: Infinity,
    retry: false,
  });
  const simulationError = errorOf("options.simulate");

  return (
    <form onSubmit={submit} noValidate className="space-y-6" aria-label="New analysis">
      {notice ? <Notice tone="error">{notice}</Notice> : null}
      {values.previousReportId ? (
        <Notice>
          This run revises an earlier report: its result becomes the report&apos;s next version.
        </Notice>
      ) : null}

      <FormStep
        number={1}
        title="Dataset"
        intro="A CSV with a header row: a label column, feature columns, optionally an id and a shard column."
      >
        <FileChoice
          workspaceId={workspaceId}
          kind="dataset"
          maxBytes={maxBytes}
          files={files.datasets}
          selectedId={values.datasetFileId}
          onSelect={(id) => {
            const file = files.datasets.find((candidate) => candidate.id === id);
            if (file) chooseDataset(file);
          }}
          onRegistered={(file) => {
            addFile("datasets", file);
            chooseDataset(file);
          }}
          inputLabel="Dataset file"
          groupLabel="Datasets in this workspace"
          error={errorOf("datasetFileId")}
        />
        {dataset?.preview ? <PreviewTable name={dataset.name} preview={dataset.preview} /> : null}
      </FormStep>

      {dataset ? (
        <>
          <FormStep
            number={2}
            title="Layout"
            intro="Which shard each row lives on: a column of the dataset, or a separate partition map."
          >
            <fieldset className="grid gap-2 md:grid-cols-2">
              <legend className="sr-only">Where the shards come from</legend>
              <ChoiceOption
                {...register("layoutSource", columnChoice)}
                value="column"
                title="A shard column in the dataset"
                detail="Each row names its shard."
              />
              <ChoiceOption
                {...register("layoutSource", columnChoice)}
                value="file"
                title="A separate partition map"
                detail="A CSV with the header row_id,shard."
              />
            </fieldset>
            {values.layoutSource === "column" ? (
              <SelectField
                id="shard-column"
                label="Shard column"
                {...register("options.shardColumn", columnChoice)}
                error={errorOf("options.shardColumn")}
                hint={
                  shardColumn
                    ? `${shardColumn.distinct} shards in the rows read.`
                    : "Shard ids are read as text."
                }
              >
                <option value="">Choose a column…</option>
                {columnNames.map((name) => (
                  <option key={name} value={name}>
                    {name}
                  </option>
                ))}
              </SelectField>
            ) : (
              <div className="space-y-3">
                <FileChoice
                  workspaceId={workspaceId}
                  kind="layout"
                  maxBytes={maxBytes}
                  files={files.layouts}
                  selectedId={values.layoutFileId}
                  onSelect={(id) => setValue("layoutFileId", id, revalidate)}
                  onRegistered={(file) => {
                    addFile("layouts", file);
                    setValue("layoutFileId", file.id, revalidate);
                  }}
                  inputLabel="Partition map file"
                  groupLabel="Partition maps in this workspace"
                  error={errorOf("layoutFileId")}
                />
                <p className="text-xs text-ink-soft">
                  {options.idColumn
                    ? `row_id is matched against the dataset's "${options.idColumn}" column.`
                    : "Without an id column, row_id is the 0-based number of the data row (header excluded)."}
                </p>
                <label className="flex items-center gap-2 text-sm">
                  <input
                    type="checkbox"
                    className="accent-indigo"
                    {...register("options.dropUnassignedRows")}
                  />
                  Leave out rows the partition map does not assign (otherwise they are an error)
                </label>
              </div>
            )}
          </FormStep>

          <FormStep
            number={3}
            title="Columns"
            intro="Rows with a missing label are left out and counted in the report."
          >
            <div className="grid gap-4 md:grid-cols-2">
              <SelectField
                id="label-column"
                label="Label column"
                {...register("options.labelColumn", columnChoice)}
                error={errorOf("options.labelColumn")}
              >
                <option value="">Choose a column…</option>
                {columnNames.map((name) => (
                  <option key={name} value={name}>
                    {name}
                  </option>
                ))}
              </SelectField>
              <SelectField
                id="id-column"
                label="Id column (optional)"
                {...register("options.idColumn", columnChoice)}
                error={errorOf("options.idColumn")}
                hint="A column that names each row, used to match a partition map."
              >
                <option value="">No id column</option>
                {columnNames.map((name) => (
                  <option key={name} value={name}>
                    {name}
                  </option>
                ))}
              </SelectField>
            </div>
            <fieldset
              className="space-y-2"
              aria-describedby={errorOf("options.features") ? "features-error" : "features-hint"}
            >
              <legend className="text-sm font-medium">
                Features ({options.features.length} of {usable.length} chosen)
              </legend>
              <div className="flex gap-2 text-xs">
                <button
                  type="button"
                  className="rounded px-2 py-1 text-indigo ring-1 ring-indigo/30 hover:bg-indigo-soft"
                  onClick={() => {
                    setFeaturesChosen(false);
                    setValue("options.features", usable, revalidate);
                  }}
                >
                  All usable columns
                </button>
                <button
                  type="button"
                  className="rounded px-2 py-1 text-ink-soft ring-1 ring-ink/20 hover:bg-paper-deep"
                  onClick={() => {
                    setFeaturesChosen(true);
                    setValue("options.features", [], revalidate);
                  }}
                >
                  None
                </button>
              </div>
              <ul className="grid gap-1 sm:grid-cols-2 lg:grid-cols-3">
                {columns.map((column) => {
                  const reserved = !usable.includes(column.name);
                  return (
                    <li key={column.name}>
                      <label
                        className={`flex items-center gap-2 rounded-md border border-ink/10 bg-white px-3 py-2 text-sm ${reserved ? "text-ink-faint" : ""}`}
                      >
                        <input
                          type="checkbox"
                          value={column.name}
                          disabled={reserved}
                          className="accent-indigo"
                          {...features}
                        />
                        <span className="min-w-0 flex-1 truncate">{column.name}</span>
                        <span className="text-xs text-ink-soft">
                          {reserved ? "in use" : column.type}
                        </span>
                      </label>
                    </li>
                  );
                })}
              </ul>
              <FieldMessage
                id="features"
                error={errorOf("options.features")}
                hint="Numeric columns are standardized; text columns with up to 32 values are one-hot encoded, others are left out with a warning."
              />
            </fieldset>
            <fieldset className="space-y-2">
              <legend className="text-sm font-medium">Task</legend>
              <div className="grid gap-2 md:grid-cols-3">
                <ChoiceOption
                  {...register("options.task")}
                  value="auto"
                  title="Detect from the label"
                  detail={
                    detectedTask
                      ? `The rows read suggest ${detectedTask}.`
                      : "Classification for text or up to 20 distinct values."
                  }
                />
                <ChoiceOption
                  {...register("options.task")}
                  value="classification"
                  title="Classification"
                  detail="Multinomial logistic regression."
                />
                <ChoiceOption
                  {...register("options.task")}
                  value="regression"
                  title="Regression"
                  detail="Least squares on the standardized target."
                />
              </div>
            </fieldset>
          </FormStep>

          <FormStep
            number={4}
            title="Reference model"
            intro="Heterogeneity is measured at a reference point of a convex proxy model."
          >
            <div className="max-w-xs">
              <InputField
                id="lambda"
                label="Regularization λ"
                type="number"
                step="any"
                inputMode="decimal"
                {...register("options.lambda", { valueAsNumber: true })}
                error={errorOf("options.lambda")}
                hint="Default 0.001; the bias is not penalized."
              />
            </div>
            <fieldset className="space-y-2">
              <legend className="text-sm font-medium">Reference point</legend>
              <div className="grid gap-2 md:grid-cols-3">
                <ChoiceOption
                  {...register("referenceSource")}
                  value="optimum"
                  title="Pooled optimum W*"
                  detail="The minimizer over all rows (default)."
                />
                <ChoiceOption
                  {...register("referenceSource")}
                  value="zero"
                  title="Zero"
                  detail="The usual start of training, W = 0."
                />
                <ChoiceOption
                  {...register("referenceSource")}
                  value="weights"
                  title="Uploaded weights"
                  detail="A JSON file with classes, features and weights."
                />
              </div>
            </fieldset>
            {values.referenceSource === "weights" ? (
              <FileChoice
                workspaceId={workspaceId}
                kind="weights"
                maxBytes={maxBytes}
                files={files.weights}
                selectedId={values.weightsFileId}
                onSelect={(id) => setValue("weightsFileId", id, revalidate)}
                onRegistered={(file) => {
                  addFile("weights", file);
                  setValue("weightsFileId", file.id, revalidate);
                }}
                inputLabel="Reference weights file"
                groupLabel="Weights in this workspace"
                error={errorOf("weightsFileId")}
              />
            ) : null}
          </FormStep>

          <FormStep
            number={5}
            title="Plan"
            intro="The training you intend: Partita compares local SGD with minibatch SGD for it."
          >
            <fieldset className="space-y-2">
              <legend className="text-sm font-medium">Participants per round (M)</legend>
              <div className="grid gap-2 md:grid-cols-2">
                <ChoiceOption
                  {...register("participantsMode")}
                  value="all"
                  title="All shards"
                  detail="Every shard takes part in every round."
                />
                <ChoiceOption
                  {...register("participantsMode")}
                  value="sample"
                  title="A sample of shards"
                  detail="A fixed number of shards per round."
                />
              </div>
            </fieldset>
            <div className="grid gap-4 md:grid-cols-4">
              {values.participantsMode === "sample" ? (
                <InputField
                  id="participants"
                  label="Shards per round (M)"
                  type="number"
                  min={1}
                  step={1}
                  {...register("options.participants", { valueAsNumber: true })}
                  error={errorOf("options.participants")}
                />
              ) : null}
              <InputField
                id="local-steps"
                label="Local steps per round (K)"
                type="number"
                min={1}
                step={1}
                {...register("options.localSteps", { valueAsNumber: true })}
                error={errorOf("options.localSteps")}
              />
              <InputField
                id="rounds"
                label="Rounds (R)"
                type="number"
                min={1}
                step={1}
                {...register("options.rounds", { valueAsNumber: true })}
                error={errorOf("options.rounds")}
              />
              <InputField
                id="batch-size"
                label="Batch size (b)"
                type="number"
                min={1}
                step={1}
                {...register("options.batchSize", { valueAsNumber: true })}
                error={errorOf("options.batchSize")}
              />
            </div>
            <fieldset
              className="space-y-3 rounded-md border border-ink/10 bg-white p-4"
              aria-describedby={simulationError ? "simulate-error" : undefined}
            >
              <legend className="sr-only">Simulation</legend>
              <label className="flex cursor-pointer items-start gap-3">
                <input
                  type="checkbox"
                  className="mt-1 accent-indigo"
                  aria-describedby="simulate-detail"
                  {...register("options.simulate.enabled")}
                />
                <span>
                  <span className="block text-sm font-medium">Also simulate</span>
                  <span id="simulate-detail" className="block text-xs text-ink-soft">
                    Runs minibatch SGD, local SGD and drift-corrected local updates on your shards
                    under this plan, on the reference model&apos;s objective, and reports the
                    outcome beside the bounds.
                  </span>
                </span>
              </label>
              {options.simulate.enabled ? (
                <>
                  <div className="max-w-xs">
                    <InputField
                      id="simulation-seeds"
                      label="Seeds (S)"
                      type="number"
                      min={1}
                      step={1}
                      {...register("options.simulate.seeds", { valueAsNumber: true })}
                      error={errorOf("options.simulate.seeds")}
                      hint="Re-runs of each algorithm's chosen step size; the report shows their spread."
                    />
                  </div>
                  <SimulationCost
                    id="simulation-cost"
                    view={simulationEstimate.data}
                    status={simulationEstimate.status}
                    showRefusal={!simulationError}
                  />
                </>
              ) : null}
              <FieldMessage id="simulate" error={simulationError} />
            </fieldset>
          </FormStep>

          <section className="space-y-4 rounded-lg border border-ink/10 bg-white p-5">
            <div className="max-w-xl">
              <InputField
                id="title"
                label="Title (optional)"
                {...register("title")}
                error={errorOf("title")}
                placeholder={`${dataset.name} · ${
                  values.layoutSource === "column"
                    ? options.shardColumn || "shard column"
                    : (files.layouts.find((file) => file.id === values.layoutFileId)?.name ??
                      "partition map")
                }`}
                hint="Shown on the report; by default the dataset and layout names."
              />
            </div>
            <Button type="submit" disabled={formState.isSubmitting}>
              {formState.isSubmitting ? "Starting…" : "Run analysis"}
            </Button>
          </section>
        </>
      ) : (
        <p className="rounded-lg border border-dashed border-ink/15 px-5 py-4 text-sm text-ink-soft">
          Upload or choose a dataset to map its columns and state your plan.
        </p>
      )}
    </form>
  );
}
