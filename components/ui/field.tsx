import type { InputHTMLAttributes } from "react";
import { controlClasses, describedBy, FieldMessage } from "./field-parts";

/** A labelled input with its hint and error wired up for screen readers. */
export function Field({
  label,
  name,
  error,
  hint,
  ...inputProps
}: InputHTMLAttributes<HTMLInputElement> & {
  label: string;
  name: string;
  error?: string;
  hint?: string;
}) {
  return (
    <div className="space-y-1">
      <label htmlFor={name} className="block text-sm font-medium text-ink">
        {label}
      </label>
      <input
        id={name}
        name={name}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy(name, error, hint)}
        className={controlClasses(error)}
        {...inputProps}
      />
      <FieldMessage id={name} error={error} hint={hint} />
    </div>
  );
}
