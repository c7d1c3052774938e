"use client";

import { useFormContext } from "react-hook-form";
import { ChoiceGroup, ColumnSelect, FileField } from "@/components/analyses/analysis-fields";
import type { AnalysisFormValues } from "@/components/analyses/analysis-form-schema";
import { FormStep } from "@/components/analyses/form-controls";
import type { DataFileSummary } from "@/db/queries/data-files";
import type { DataFilePreview } from "@/db/schema/analyses";

const LAYOUT_SOURCES = [
  { value: "column", title: "A shard column in the dataset", detail: "Each row names its shard." },
  {
    value: "file",
    title: "A separate partition map",
    detail: "A CSV with the header row_id,shard.",
  },
] as const;

/** Step 2: where each row's shard comes from, a column of the dataset or a partition map. */
export function LayoutStep({
  workspaceId,
  maxBytes,
  values,
  columns,
  layouts,
  onUploaded,
  onColumnChange,
}: {
  workspaceId: string;
  maxBytes: number;
  values: AnalysisFormValues;
  columns: DataFilePreview["columns"];
  layouts: DataFileSummary[];
  onUploaded(file: DataFileSummary): void;
  /** Called when a choice changes which columns are in use. */
  onColumnChange(): void;
}) {
  const { register } = useFormContext<AnalysisFormValues>();
  const { idColumn, shardColumn } = values.options;
  const shards = columns.find((column) => column.name === shardColumn);
  return (
    <FormStep
      number={2}
      title="Layout"
      intro="Which shard each row lives on: a column of the dataset, or a separate partition map."
    >
      <ChoiceGroup
        legend="Where the shards come from"
        hideLegend
        path="layoutSource"
        choices={LAYOUT_SOURCES}
        columns={2}
        onChange={onColumnChange}
      />
      {values.layoutSource === "column" ? (
        <ColumnSelect
          id="shard-column"
          label="Shard column"
          path="options.shardColumn"
          noColumn="Choose a column…"
          columnNames={columns.map((column) => column.name)}
          onChange={onColumnChange}
          hint={
            shards ? `${shards.distinct} shards in the rows read.` : "Shard ids are read as text."
          }
        />
      ) : (
        <div className="space-y-3">
          <FileField
            path="layoutFileId"
            workspaceId={workspaceId}
            kind="layout"
            maxBytes={maxBytes}
            files={layouts}
            onUploaded={onUploaded}
            inputLabel="Partition map file"
            groupLabel="Partition maps in this workspace"
          />
          <p className="text-xs text-ink-soft">
            {idColumn
              ? `row_id is matched against the dataset's "${idColumn}" column.`
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
  );
}
