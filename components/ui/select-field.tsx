import type { Ref, SelectHTMLAttributes } from "react";
import { controlAttributes, LabelledControl, type LabelledControlProps } from "./field-parts";

/** A labelled drop-down, wired like Field; its options are the children. */
export function SelectField({
  label,
  name,
  id = name,
  error,
  hint,
  ref,
  children,
  ...selectProps
}: SelectHTMLAttributes<HTMLSelectElement> &
  LabelledControlProps & { name: string; ref?: Ref<HTMLSelectElement> }) {
  return (
    <LabelledControl id={id} label={label} error={error} hint={hint}>
      <select {...controlAttributes(id, error, hint)} ref={ref} name={name} {...selectProps}>
        {children}
      </select>
    </LabelledControl>
  );
}
