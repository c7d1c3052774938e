"use client";

import { useFormContext } from "react-hook-form";
import { useFieldError } from "@/components/analyses/analysis-form-hooks";
import type { AnalysisFormValues } from "@/components/analyses/analysis-form-schema";
import { FieldMessage } from "@/components/ui/field-parts";
import type { DataFilePreview } from "@/db/schema/analyses";

/** The feature columns as checkboxes; the label, id and shard columns show as in use. */
export function FeaturesFieldset({
  columns,
  usable,
  chosenCount,
  onChooseAll,
  onChooseNone,
  onPick,
}: {
  columns: DataFilePreview["columns"];
  /** The columns that may be features under the current label, id and shard choices. */
  usable: string[];
  chosenCount: number;
  onChooseAll(): void;
  onChooseNone(): void;
  onPick(): void;
}) {
  const { register } = useFormContext<AnalysisFormValues>();
  const error = useFieldError("options.features");
  const features = register("options.features", { onChange: onPick });
  return (
    <fieldset className="space-y-2" aria-describedby={error ? "features-error" : "features-hint"}>
      <legend className="text-sm font-medium">
        Features ({chosenCount} of {usable.length} chosen)
      </legend>
      <div className="flex gap-2 text-xs">
        <button
          type="button"
          className="rounded px-2 py-1 text-indigo ring-1 ring-indigo/30 hover:bg-indigo-soft"
          onClick={onChooseAll}
        >
          All usable columns
        </button>
        <button
          type="button"
          className="rounded px-2 py-1 text-ink-soft ring-1 ring-ink/20 hover:bg-paper-deep"
          onClick={onChooseNone}
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
                <span className="text-xs text-ink-soft">{reserved ? "in use" : column.type}</span>
              </label>
            </li>
          );
        })}
      </ul>
      <FieldMessage
        id="features"
        error={error}
        hint="Numeric columns are standardized; text columns with up to 32 values are one-hot encoded, others are left out with a warning."
      />
    </fieldset>
  );
}
