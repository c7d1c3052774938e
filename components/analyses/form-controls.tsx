import type { InputHTMLAttributes, ReactNode, Ref, SelectHTMLAttributes } from "react";
import { controlClasses, describedBy, FieldMessage } from "@/components/ui/field-parts";

// Labelled controls for react-hook-form: each takes register()'s props (including its ref, a plain
// prop in React 19) and wires its hint and error to screen readers.

export function SelectField({
  id,
  label,
  error,
  hint,
  children,
  ref,
  ...selectProps
}: SelectHTMLAttributes<HTMLSelectElement> & {
  id: string;
  label: string;
  error?: string;
  hint?: ReactNode;
  ref?: Ref<HTMLSelectElement>;
}) {
  return (
    <div className="space-y-1">
      <label htmlFor={id} className="block text-sm font-medium">
        {label}
      </label>
      <select
        id={id}
        ref={ref}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy(id, error, hint)}
        className={controlClasses(error)}
        {...selectProps}
      >
        {children}
      </select>
      <FieldMessage id={id} error={error} hint={hint} />
    </div>
  );
}

export function InputField({
  id,
  label,
  error,
  hint,
  ref,
  ...inputProps
}: InputHTMLAttributes<HTMLInputElement> & {
  id: string;
  label: string;
  error?: string;
  hint?: ReactNode;
  ref?: Ref<HTMLInputElement>;
}) {
  return (
    <div className="space-y-1">
      <label htmlFor={id} className="block text-sm font-medium">
        {label}
      </label>
      <input
        id={id}
        ref={ref}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy(id, error, hint)}
        className={controlClasses(error)}
        {...inputProps}
      />
      <FieldMessage id={id} error={error} hint={hint} />
    </div>
  );
}

/** A radio button with a title and an optional line of explanation, inside a fieldset. */
export function ChoiceOption({
  title,
  detail,
  children,
  ref,
  ...inputProps
}: InputHTMLAttributes<HTMLInputElement> & {
  title: string;
  detail?: ReactNode;
  children?: ReactNode;
  ref?: Ref<HTMLInputElement>;
}) {
  return (
    <label className="flex cursor-pointer items-start gap-3 rounded-md border border-ink/10 bg-white p-3 has-checked:border-indigo has-checked:bg-indigo-soft/40">
      <input type="radio" ref={ref} className="mt-1 accent-indigo" {...inputProps} />
      <span className="min-w-0 flex-1">
        <span className="block text-sm font-medium">{title}</span>
        {detail ? <span className="block text-xs text-ink-soft">{detail}</span> : null}
        {children}
      </span>
    </label>
  );
}

/** A numbered part of the form. */
export function FormStep({
  number,
  title,
  intro,
  children,
}: {
  number: number;
  title: string;
  intro?: ReactNode;
  children: ReactNode;
}) {
  const headingId = `step-${number}-title`;
  return (
    <section
      aria-labelledby={headingId}
      className="space-y-4 rounded-lg border border-ink/10 bg-paper/60 p-5"
    >
      <div className="flex items-start gap-3">
        <span className="inline-flex h-7 w-7 shrink-0 items-center justify-center rounded-full bg-indigo-soft text-sm font-semibold text-indigo">
          {number}
        </span>
        <div>
          <h2 id={headingId} className="font-semibold">
            {title}
          </h2>
          {intro ? <p className="text-sm text-ink-soft">{intro}</p> : null}
        </div>
      </div>
      {children}
    </section>
  );
}
