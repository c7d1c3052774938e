/** How the analysis ran when it was shared by several workers (lib/reports/part-run-notes.ts). */
export function PartRunNotes({ notes }: { notes: string[] }) {
  if (notes.length === 0) return null;
  return (
    <section aria-labelledby="part-run-heading" className="text-sm print:break-inside-avoid">
      <h2 id="part-run-heading" className="mb-1 font-semibold text-ink">
        How this analysis ran
      </h2>
      <ul className="list-disc space-y-1 pl-5 text-ink-soft">
        {notes.map((note) => (
          <li key={note}>{note}</li>
        ))}
      </ul>
    </section>
  );
}
