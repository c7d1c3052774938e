import type { ReactNode } from "react";

/**
 * One piece of evidence: a heading, a one-sentence plain-language caption, the chart (or its empty
 * state) and an optional note. Kept whole on a printed page.
 */
export function EvidenceSection({
  id,
  title,
  caption,
  note,
  children,
}: {
  id: string;
  title: string;
  caption: string;
  note?: ReactNode;
  children: ReactNode;
}) {
  return (
    <section
      aria-labelledby={`${id}-heading`}
      className="rounded-lg border border-ink/10 bg-white p-5 print:break-inside-avoid print:border-ink/20"
    >
      <h3 id={`${id}-heading`} className="text-base font-semibold text-ink">
        {title}
      </h3>
      <p id={`${id}-caption`} className="mt-1 max-w-prose text-sm text-ink-soft">
        {caption}
      </p>
      <div className="mt-4 max-w-[680px]">{children}</div>
      {note ? <p className="mt-3 text-xs text-ink-soft">{note}</p> : null}
    </section>
  );
}

/** What a chart shows instead when there is nothing to draw, and why. */
export function ChartEmptyState({ children }: { children: ReactNode }) {
  return (
    <p className="rounded-md border border-dashed border-ink/20 bg-paper px-4 py-6 text-center text-sm text-ink-soft">
      {children}
    </p>
  );
}
