"use client";

import { ChoiceGroup, FileField, FormField } from "@/components/analyses/analysis-fields";
import { FormStep } from "@/components/analyses/form-controls";
import type { DataFileSummary } from "@/db/queries/data-files";

const REFERENCE_POINTS = [
  {
    value: "optimum",
    title: "Pooled optimum W*",
    detail: "The minimizer over all rows (default).",
  },
  { value: "zero", title: "Zero", detail: "The usual start of training, W = 0." },
  {
    value: "weights",
    title: "Uploaded weights",
    detail: "A JSON file with classes, features and weights.",
  },
] as const;

/** Step 4: the reference model's regularization and the point heterogeneity is measured at. */
export function ReferenceStep({
  workspaceId,
  maxBytes,
  usesWeightsFile,
  weights,
  onUploaded,
}: {
  workspaceId: string;
  maxBytes: number;
  usesWeightsFile: boolean;
  weights: DataFileSummary[];
  onUploaded(file: DataFileSummary): void;
}) {
  return (
    <FormStep
      number={4}
      title="Reference model"
      intro="Heterogeneity is measured at a reference point of a convex proxy model."
    >
      <ReferencePointFields />
      {usesWeightsFile ? (
        <FileField
          path="weightsFileId"
          workspaceId={workspaceId}
          kind="weights"
          maxBytes={maxBytes}
          files={weights}
          onUploaded={onUploaded}
          inputLabel="Reference weights file"
          groupLabel="Weights in this workspace"
        />
      ) : null}
    </FormStep>
  );
}

/**
 * λ and the reference point, also used by the federated analysis form, whose values carry the
 * same names.
 */
export function ReferencePointFields() {
  return (
    <>
      <div className="max-w-xs">
        <FormField
          id="lambda"
          label="Regularization λ"
          path="options.lambda"
          type="number"
          step="any"
          inputMode="decimal"
          hint="Default 0.001; the bias is not penalized."
        />
      </div>
      <ChoiceGroup
        legend="Reference point"
        path="referenceSource"
        choices={REFERENCE_POINTS}
        columns={3}
      />
    </>
  );
}
