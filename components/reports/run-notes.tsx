/** How the analysis ran, where it differs from one process in memory (lib/reports/run-notes.ts). */
export function RunNotes({ notes }: { notes: string[] }) {
  if (notes.length === 0) return null;
  return (
    <section aria-labelledby="run-notes-heading" className="text-sm print:break-inside-avoid">
      <h2 id="run-notes-heading" className="mb-1 font-semibold text-ink">
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
