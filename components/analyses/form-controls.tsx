import type { InputHTMLAttributes, ReactNode, Ref } from "react";

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
