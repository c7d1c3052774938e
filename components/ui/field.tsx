import type { InputHTMLAttributes } from "react";

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
  const describedBy = [error ? `${name}-error` : null, hint ? `${name}-hint` : null]
    .filter(Boolean)
    .join(" ");
  return (
    <div className="space-y-1">
      <label htmlFor={name} className="block text-sm font-medium text-ink">
        {label}
      </label>
      <input
        id={name}
        name={name}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy || undefined}
        className={`block w-full rounded-md border bg-white px-3 py-2 text-sm text-ink shadow-sm placeholder:text-ink-faint focus:border-indigo focus:outline-none focus:ring-2 focus:ring-indigo/30 ${error ? "border-cadmium" : "border-ink/20"}`}
        {...inputProps}
      />
      {hint && !error ? (
        <p id={`${name}-hint`} className="text-xs text-ink-soft">
          {hint}
        </p>
      ) : null}
      {error ? (
        <p id={`${name}-error`} role="alert" className="text-xs font-medium text-cadmium">
          {error}
        </p>
      ) : null}
    </div>
  );
}
