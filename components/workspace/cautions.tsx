import { DIGEST_CAUTION } from "@/lib/federated/digest-caution";

/**
 * The cautions from the product brief; shown wherever reports are read. For a report built from
 * client digests the sharing caution is the digests' own (what they disclose), said once.
 */
export function Cautions({
  sharing = false,
  digests = false,
}: {
  sharing?: boolean;
  digests?: boolean;
}) {
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
          {digests
            ? DIGEST_CAUTION
            : "Per-shard gradients and label counts can reveal information about a client's data."}{" "}
          Think before sharing a report outside this workspace.
        </p>
      ) : null}
    </aside>
  );
}
