import type { InputHTMLAttributes, Ref } from "react";
import { controlAttributes, LabelledControl, type LabelledControlProps } from "./field-parts";

/**
 * A labelled input with its hint and error wired up for screen readers. The id defaults to the
 * name; react-hook-form's register() props (its ref is a plain prop in React 19) spread straight in.
 */
export function Field({
  label,
  name,
  id = name,
  error,
  hint,
  ref,
  ...inputProps
}: InputHTMLAttributes<HTMLInputElement> &
  LabelledControlProps & { name: string; ref?: Ref<HTMLInputElement> }) {
  return (
    <LabelledControl id={id} label={label} error={error} hint={hint}>
      <input {...controlAttributes(id, error, hint)} ref={ref} name={name} {...inputProps} />
    </LabelledControl>
  );
}
