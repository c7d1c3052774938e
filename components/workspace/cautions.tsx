/** The cautions from the product brief; shown wherever reports are read. */
export function Cautions({ sharing = false }: { sharing?: boolean }) {
  return (
    <aside
      aria-label="Cautions"
      className="rounded-md border border-ink/10 bg-white p-4 text-sm text-ink-soft"
    >
      <h2 className="mb-1 font-semibold text-ink">Read the verdict as a planning guide</h2>
      <p>
        The verdict rests on a convex proxy model and on convergence rates that hide constants; deep
        networks may behave differently. It is a guide for planning, not a guarantee.
      </p>
      {sharing ? (
        <p className="mt-2">
          Per-shard gradients and label counts can reveal information about a client&apos;s data.
          Think before sharing a report outside this workspace.
        </p>
      ) : null}
    </aside>
  );
}
