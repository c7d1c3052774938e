"use client";

import { useState, type ChangeEvent } from "react";
import { useFormContext, useFormState, useWatch } from "react-hook-form";
import { FieldMessage } from "@/components/ui/field-parts";
import { referenceWeightsSchema } from "@/lib/validation/analysis-options";
import type { FederatedFormValues } from "@/lib/validation/federated-form";

/**
 * The team's current model as the reference point: a weights JSON file (classes, features,
 * weights — the shape of a report's model.optimum), read in the browser and sent with the form.
 * A file that is not such JSON is refused with its name and what was wrong; the form keeps the
 * last good file.
 */
export function WeightsFileField() {
  const { setValue, control } = useFormContext<FederatedFormValues>();
  const { isSubmitted, errors } = useFormState({ control, name: "weights" });
  const fileName = useWatch({ control, name: "weightsFileName" });
  const weights = useWatch({ control, name: "weights" });
  const [readError, setReadError] = useState<string>();

  async function read(event: ChangeEvent<HTMLInputElement>) {
    const file = event.target.files?.[0];
    if (!file) return;
    setReadError(undefined);
    let parsed: unknown;
    try {
      parsed = JSON.parse(await file.text());
    } catch (error) {
      setReadError(`${file.name} is not JSON: ${(error as Error).message}.`);
      return;
    }
    const checked = referenceWeightsSchema.safeParse(parsed);
    if (!checked.success) {
      const problem = checked.error.issues[0];
      setReadError(
        `${file.name}: ${problem.path.join(".") || "the file"} — ${problem.message}. Expected { "classes": [...] or null, "features": [...], "weights": [[...], ...] }.`,
      );
      return;
    }
    setValue("weights", checked.data, { shouldValidate: isSubmitted, shouldDirty: true });
    setValue("weightsFileName", file.name, { shouldDirty: true });
  }

  const error = readError ?? errors.weights?.message;
  return (
    <div className="space-y-1">
      <label htmlFor="weights-file" className="block text-sm font-medium">
        Reference weights file
      </label>
      <input
        id="weights-file"
        type="file"
        accept="application/json,.json"
        onChange={read}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? "weights-file-error" : "weights-file-hint"}
        className="block text-sm"
      />
      {weights ? (
        <p className="text-sm text-ink-soft" data-testid="weights-chosen">
          Using {fileName || "the weights read"}: {weights.weights.length} row
          {weights.weights.length === 1 ? "" : "s"} over {weights.features.length} features
          {weights.classes ? ` (classes ${weights.classes.join(", ")})` : " (regression)"}.
        </p>
      ) : null}
      <FieldMessage
        id="weights-file"
        error={error}
        hint="The team's current global model: one row per class (one for regression) over the encoded features plus the bias last."
      />
    </div>
  );
}
