import type { TextareaHTMLAttributes } from "react";
import { controlAttributes, LabelledControl, type LabelledControlProps } from "./field-parts";

/** A labelled multi-line input, wired like Field; three rows unless told otherwise. */
export function TextArea({
  label,
  name,
  id = name,
  error,
  hint,
  ...textAreaProps
}: TextareaHTMLAttributes<HTMLTextAreaElement> & LabelledControlProps & { name: string }) {
  return (
    <LabelledControl id={id} label={label} error={error} hint={hint}>
      <textarea {...controlAttributes(id, error, hint)} name={name} rows={3} {...textAreaProps} />
    </LabelledControl>
  );
}
