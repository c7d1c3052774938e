import type { ReactNode } from "react";

/** The look every text-like control shares, with the error state in cadmium. */
export function controlClasses(error?: string): string {
  return `block w-full rounded-md border bg-white px-3 py-2 text-sm text-ink shadow-sm placeholder:text-ink-faint focus:border-indigo focus:outline-none focus:ring-2 focus:ring-indigo/30 disabled:bg-paper-deep disabled:text-ink-faint ${error ? "border-cadmium" : "border-ink/20"}`;
}

/** The ids a control's aria-describedby names: its error, else its hint. */
export function describedBy(id: string, error?: string, hint?: ReactNode): string | undefined {
  return (
    [error ? `${id}-error` : null, hint ? `${id}-hint` : null].filter(Boolean).join(" ") ||
    undefined
  );
}

/** A control's error (announced) or, when there is none, its hint. */
export function FieldMessage({
  id,
  error,
  hint,
}: {
  id: string;
  error?: string;
  hint?: ReactNode;
}) {
  if (error) {
    return (
      <p id={`${id}-error`} role="alert" className="text-xs font-medium text-cadmium">
        {error}
      </p>
    );
  }
  return hint ? (
    <p id={`${id}-hint`} className="text-xs text-ink-soft">
      {hint}
    </p>
  ) : null;
}
