import type { DigestProvenance as Provenance } from "@/lib/analysis/browser";

/**
 * For a report built from client digests (methods.md §9): how many clients sent what (shards and
 * rows, never a row), who was expected but missing, and how the reference point was reached. The
 * caution that digests are aggregates, not a privacy guarantee, is among the page's cautions.
 */
export function DigestProvenance({ digests }: { digests: Provenance }) {
  const { clients, missingClients } = digests;
  const rows = clients.reduce((total, client) => total + client.rows, 0);
  const shards = clients.reduce((total, client) => total + client.shards.length, 0);
  return (
    <section
      aria-labelledby="digests-heading"
      className="space-y-3 rounded-lg border border-indigo/30 bg-indigo-soft/40 p-5 text-sm print:break-inside-avoid"
    >
      <h2 id="digests-heading" className="text-lg font-semibold text-ink">
        Built from client digests
      </h2>
      <p className="max-w-prose">
        {clients.length} client{clients.length === 1 ? "" : "s"} sent counts and sums of their own
        shards — {shards} shard{shards === 1 ? "" : "s"}, {rows.toLocaleString("en-US")} rows in all
        — and no row left any of them.{" "}
        {digests.fitted
          ? "The pooled optimum W* was fitted on the server from the clients' sums."
          : "The reference point was given (zero or the team's own weights), so no fit was needed."}
        {digests.labelSkewFromHistogram
          ? " The regression label skew comes from a 4096-cell histogram of the standardized target, not from the rows."
          : ""}
      </p>
      <table className="w-full max-w-xl" aria-label="What each client sent">
        <thead className="text-left text-xs tracking-wide text-ink-soft uppercase">
          <tr>
            <th scope="col" className="py-1 pr-3 font-medium">
              Client
            </th>
            <th scope="col" className="py-1 pr-3 font-medium">
              Shards
            </th>
            <th scope="col" className="py-1 text-right font-medium">
              Rows
            </th>
          </tr>
        </thead>
        <tbody className="divide-y divide-ink/5">
          {clients.map((client) => (
            <tr key={client.client}>
              <th scope="row" className="py-1 pr-3 text-left font-medium break-words">
                {client.client}
              </th>
              <td className="py-1 pr-3 break-words">{client.shards.join(", ")}</td>
              <td className="py-1 text-right tabular-nums">
                {client.rows.toLocaleString("en-US")}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {missingClients.length > 0 ? (
        <p className="font-medium">
          Missing: {missingClients.map((name) => `“${name}”`).join(", ")} — expected, but the roster
          was closed without {missingClients.length === 1 ? "it" : "them"}; the report describes
          only the clients above.
        </p>
      ) : (
        <p>Every expected client sent its digests.</p>
      )}
      <p className="font-mono text-[11px] break-all text-ink-soft">
        Encoding SHA-256 {digests.encodingHash}
      </p>
    </section>
  );
}
