"use client";

import { useFormContext, useFormState, type FieldPath, type FieldPathValue } from "react-hook-form";
import type { AnalysisFormValues } from "@/components/analyses/analysis-form-schema";

type FormPath = FieldPath<AnalysisFormValues>;

/** The message on one field of the analysis form, from the browser's checks or the server's. */
export function useFieldError(path: FormPath): string | undefined {
  const { getFieldState, control } = useFormContext<AnalysisFormValues>();
  const formState = useFormState({ control, name: path });
  return getFieldState(path, formState).error?.message;
}

/**
 * Sets a value chosen outside a registered input (a file, the features) the way an input would:
 * marked dirty, and checked again once the form has been submitted.
 */
export function useSetChoice() {
  const { setValue, control } = useFormContext<AnalysisFormValues>();
  const { isSubmitted } = useFormState({ control });
  return <Path extends FormPath>(path: Path, value: FieldPathValue<AnalysisFormValues, Path>) =>
    setValue(path, value, { shouldValidate: isSubmitted, shouldDirty: true });
}
