import type { TextareaHTMLAttributes } from "react";
import { controlClasses, describedBy, FieldMessage } from "./field-parts";

/** A labelled multi-line input with its error wired up for screen readers. */
export function TextArea({
  label,
  name,
  error,
  ...props
}: TextareaHTMLAttributes<HTMLTextAreaElement> & { label: string; name: string; error?: string }) {
  return (
    <div className="space-y-1">
      <label htmlFor={name} className="block text-sm font-medium text-ink">
        {label}
      </label>
      <textarea
        id={name}
        name={name}
        rows={3}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy(name, error)}
        className={controlClasses(error)}
        {...props}
      />
      <FieldMessage id={name} error={error} />
    </div>
  );
}
