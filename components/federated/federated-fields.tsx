"use client";

import type { ComponentProps } from "react";
import { useFormContext, useFormState, type FieldPath } from "react-hook-form";
import { Field } from "@/components/ui/field";
import { TextArea } from "@/components/ui/text-area";
import type { FederatedFormValues } from "@/lib/validation/federated-form";

type FormPath = FieldPath<FederatedFormValues>;

/** The message on one field of the federated form, from the browser's checks or the server's. */
export function useFederatedFieldError(path: FormPath): string | undefined {
  const { getFieldState, control } = useFormContext<FederatedFormValues>();
  const formState = useFormState({ control, name: path });
  return getFieldState(path, formState).error?.message;
}

/** A text or number input of the federated form (a number input's value kept as a number). */
export function FederatedField({
  path,
  ...fieldProps
}: Omit<ComponentProps<typeof Field>, "name" | "error"> & { path: FormPath }) {
  const { register } = useFormContext<FederatedFormValues>();
  const error = useFederatedFieldError(path);
  return (
    <Field
      {...fieldProps}
      {...register(path, { valueAsNumber: fieldProps.type === "number" })}
      error={error}
    />
  );
}

/** A multi-line input of the federated form (a list, one item a line). */
export function FederatedTextArea({
  path,
  ...areaProps
}: Omit<ComponentProps<typeof TextArea>, "name" | "error"> & {
  path: "clientsText" | "options.featuresText";
}) {
  const { register } = useFormContext<FederatedFormValues>();
  const error = useFederatedFieldError(path);
  return <TextArea {...areaProps} {...register(path)} error={error} />;
}
