import type { ReactNode } from "react";

/** The look every text-like control shares, with the error state in cadmium. */
function controlClasses(error?: string): string {
  return `block w-full rounded-md border bg-white px-3 py-2 text-sm text-ink shadow-sm placeholder:text-ink-faint focus:border-indigo focus:outline-none focus:ring-2 focus:ring-indigo/30 disabled:bg-paper-deep disabled:text-ink-faint ${error ? "border-cadmium" : "border-ink/20"}`;
}

/** The ids a control's aria-describedby names: its error, else its hint. */
function describedBy(id: string, error?: string, hint?: ReactNode): string | undefined {
  return (
    [error ? `${id}-error` : null, hint ? `${id}-hint` : null].filter(Boolean).join(" ") ||
    undefined
  );
}

/** What every labelled control takes besides its element's own attributes. */
export interface LabelledControlProps {
  label: string;
  error?: string;
  hint?: ReactNode;
}

/**
 * The attributes that tie a control to its label, error and hint for screen readers, with the
 * shared look; spread them before the caller's own props so those can still override.
 */
export function controlAttributes(id: string, error?: string, hint?: ReactNode) {
  return {
    id,
    "aria-invalid": error ? true : undefined,
    "aria-describedby": describedBy(id, error, hint),
    className: controlClasses(error),
  } as const;
}

/** A control's label above it and its error or hint below it. */
export function LabelledControl({
  id,
  label,
  error,
  hint,
  children,
}: LabelledControlProps & { id: string; children: ReactNode }) {
  return (
    <div className="space-y-1">
      <label htmlFor={id} className="block text-sm font-medium text-ink">
        {label}
      </label>
      {children}
      <FieldMessage id={id} error={error} hint={hint} />
    </div>
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
