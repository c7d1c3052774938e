import type { TextareaHTMLAttributes } from "react";

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
        aria-describedby={error ? `${name}-error` : undefined}
        className={`block w-full rounded-md border bg-white px-3 py-2 text-sm text-ink shadow-sm placeholder:text-ink-faint focus:border-indigo focus:ring-2 focus:ring-indigo/30 focus:outline-none ${error ? "border-cadmium" : "border-ink/20"}`}
        {...props}
      />
      {error ? (
        <p id={`${name}-error`} role="alert" className="text-xs font-medium text-cadmium">
          {error}
        </p>
      ) : null}
    </div>
  );
}
