import Link from "next/link";
import type { ReactNode } from "react";
import { buttonClasses } from "./button";

const CONTROL =
  "mt-1 block rounded-md border border-ink/20 bg-white px-3 py-1.5 text-sm text-ink focus:border-indigo focus:ring-2 focus:ring-indigo/30 focus:outline-none";
const LABEL = "block text-xs font-medium text-ink-soft";

/**
 * A list's filters as a plain GET form: the choice lives in the URL, so a filtered list can be
 * bookmarked and shared, and the form works from the keyboard without any script.
 */
export function FilterBar({
  action,
  label,
  children,
}: {
  action: string;
  label: string;
  children: ReactNode;
}) {
  return (
    <form
      method="get"
      action={action}
      role="search"
      aria-label={label}
      className="flex flex-wrap items-end gap-3 rounded-lg border border-ink/10 bg-white p-4"
    >
      {children}
      <div className="flex gap-2">
        <button type="submit" className={buttonClasses("primary")}>
          Apply
        </button>
        <Link href={action} className={buttonClasses("quiet")}>
          Clear
        </Link>
      </div>
    </form>
  );
}

/** A select whose empty first option means "no filter". */
export function FilterSelect({
  id,
  name,
  label,
  value,
  anyLabel,
  options,
}: {
  id: string;
  name: string;
  label: string;
  value: string | undefined;
  anyLabel: string;
  options: readonly { value: string; label: string }[];
}) {
  return (
    <div>
      <label htmlFor={id} className={LABEL}>
        {label}
      </label>
      <select id={id} name={name} defaultValue={value ?? ""} className={CONTROL}>
        <option value="">{anyLabel}</option>
        {options.map((option) => (
          <option key={option.value} value={option.value}>
            {option.label}
          </option>
        ))}
      </select>
    </div>
  );
}

/** A text or date input of the filter bar. */
export function FilterInput({
  id,
  name,
  label,
  value,
  type,
  className = "",
}: {
  id: string;
  name: string;
  label: string;
  value: string | undefined;
  type: "search" | "date";
  className?: string;
}) {
  return (
    <div>
      <label htmlFor={id} className={LABEL}>
        {label}
      </label>
      <input
        id={id}
        name={name}
        type={type}
        defaultValue={value ?? ""}
        maxLength={type === "search" ? 100 : undefined}
        className={`${CONTROL} ${className}`}
      />
    </div>
  );
}
