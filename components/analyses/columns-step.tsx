"use client";

import { ChoiceGroup, ColumnSelect } from "@/components/analyses/analysis-fields";
import { FeaturesFieldset } from "@/components/analyses/features-fieldset";
import { FormStep } from "@/components/analyses/form-controls";
import type { DataFilePreview } from "@/db/schema/analyses";
import { detectTask } from "@/lib/uploads/preview-task";

/** Step 3: the label, the optional id, the features and the task. */
export function ColumnsStep({
  columns,
  labelColumn,
  usable,
  chosenCount,
  onColumnChange,
  onChooseAll,
  onChooseNone,
  onPick,
}: {
  columns: DataFilePreview["columns"];
  labelColumn: string;
  usable: string[];
  chosenCount: number;
  /** Called when a choice changes which columns are in use. */
  onColumnChange(): void;
  onChooseAll(): void;
  onChooseNone(): void;
  onPick(): void;
}) {
  const columnNames = columns.map((column) => column.name);
  const label = columns.find((column) => column.name === labelColumn);
  const detectedTask = label ? detectTask(label) : undefined;
  const tasks = [
    {
      value: "auto",
      title: "Detect from the label",
      detail: detectedTask
        ? `The rows read suggest ${detectedTask}.`
        : "Classification for text or up to 20 distinct values.",
    },
    {
      value: "classification",
      title: "Classification",
      detail: "Multinomial logistic regression.",
    },
    {
      value: "regression",
      title: "Regression",
      detail: "Least squares on the standardized target.",
    },
  ];
  return (
    <FormStep
      number={3}
      title="Columns"
      intro="Rows with a missing label are left out and counted in the report."
    >
      <div className="grid gap-4 md:grid-cols-2">
        <ColumnSelect
          id="label-column"
          label="Label column"
          path="options.labelColumn"
          noColumn="Choose a column…"
          columnNames={columnNames}
          onChange={onColumnChange}
        />
        <ColumnSelect
          id="id-column"
          label="Id column (optional)"
          path="options.idColumn"
          noColumn="No id column"
          columnNames={columnNames}
          onChange={onColumnChange}
          hint="A column that names each row, used to match a partition map."
        />
      </div>
      <FeaturesFieldset
        columns={columns}
        usable={usable}
        chosenCount={chosenCount}
        onChooseAll={onChooseAll}
        onChooseNone={onChooseNone}
        onPick={onPick}
      />
      <ChoiceGroup legend="Task" path="options.task" choices={tasks} columns={3} />
    </FormStep>
  );
}
