"use client";

import type { ComponentProps, ReactNode } from "react";
import { useFormContext, useWatch, type FieldPath } from "react-hook-form";
import { useFieldError, useSetChoice } from "@/components/analyses/analysis-form-hooks";
import type { AnalysisFormValues } from "@/components/analyses/analysis-form-schema";
import { FileChoice } from "@/components/analyses/file-choice";
import { ChoiceOption } from "@/components/analyses/form-controls";
import { Field } from "@/components/ui/field";
import { SelectField } from "@/components/ui/select-field";
import type { DataFileSummary } from "@/db/queries/data-files";

// The analysis form's fields, each bound to its value by path: register()'s props, its error and
// its hint come from one place, so a new field is one line in a step.

type FormPath = FieldPath<AnalysisFormValues>;

/** A text or number input; a number input's value is kept as a number (NaN when emptied). */
export function FormField({
  path,
  ...fieldProps
}: Omit<ComponentProps<typeof Field>, "name" | "error"> & { path: FormPath }) {
  const { register } = useFormContext<AnalysisFormValues>();
  const error = useFieldError(path);
  return (
    <Field
      {...fieldProps}
      {...register(path, { valueAsNumber: fieldProps.type === "number" })}
      error={error}
    />
  );
}

/** The input props of a count of at least one. */
export const WHOLE_NUMBER = { type: "number", min: 1, step: 1 } as const;

/** A drop-down of the dataset's columns, led by the "no column" option. */
export function ColumnSelect({
  id,
  label,
  path,
  noColumn,
  columnNames,
  hint,
  onChange,
}: {
  id: string;
  label: string;
  path: "options.labelColumn" | "options.idColumn" | "options.shardColumn";
  /** The text of the empty choice, e.g. "Choose a column…". */
  noColumn: string;
  columnNames: string[];
  hint?: ReactNode;
  onChange(): void;
}) {
  const { register } = useFormContext<AnalysisFormValues>();
  const error = useFieldError(path);
  return (
    <SelectField id={id} label={label} {...register(path, { onChange })} error={error} hint={hint}>
      <option value="">{noColumn}</option>
      {columnNames.map((name) => (
        <option key={name} value={name}>
          {name}
        </option>
      ))}
    </SelectField>
  );
}

/** One option of a ChoiceGroup. */
export interface Choice {
  value: string;
  title: string;
  detail: ReactNode;
}

// Whole class names, so Tailwind finds them in the source.
const GRID_COLUMNS = { 2: "md:grid-cols-2", 3: "md:grid-cols-3" } as const;

/** A set of radio options side by side under a legend (hidden when the step's title says it). */
export function ChoiceGroup({
  legend,
  hideLegend = false,
  path,
  choices,
  columns,
  onChange,
}: {
  legend: string;
  hideLegend?: boolean;
  path: "layoutSource" | "options.task" | "referenceSource" | "participantsMode";
  choices: readonly Choice[];
  columns: keyof typeof GRID_COLUMNS;
  onChange?(): void;
}) {
  const { register } = useFormContext<AnalysisFormValues>();
  return (
    <fieldset className="space-y-2">
      <legend className={hideLegend ? "sr-only" : "text-sm font-medium"}>{legend}</legend>
      <div className={`grid gap-2 ${GRID_COLUMNS[columns]}`}>
        {choices.map((choice) => (
          <ChoiceOption
            key={choice.value}
            {...register(path, { onChange })}
            value={choice.value}
            title={choice.title}
            detail={choice.detail}
          />
        ))}
      </div>
    </fieldset>
  );
}

/** A second input file (partition map, weights): a new upload is chosen as soon as it arrives. */
export function FileField({
  path,
  onUploaded,
  ...choice
}: Omit<ComponentProps<typeof FileChoice>, "selectedId" | "onSelect" | "onRegistered" | "error"> & {
  path: "layoutFileId" | "weightsFileId";
  /** Adds the upload to the workspace's list. */
  onUploaded(file: DataFileSummary): void;
}) {
  const { control } = useFormContext<AnalysisFormValues>();
  const selectedId = useWatch({ control, name: path });
  const setChoice = useSetChoice();
  const error = useFieldError(path);
  return (
    <FileChoice
      {...choice}
      selectedId={selectedId}
      onSelect={(id) => setChoice(path, id)}
      onRegistered={(file) => {
        onUploaded(file);
        setChoice(path, file.id);
      }}
      error={error}
    />
  );
}
