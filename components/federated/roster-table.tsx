import type { RosterEntry } from "@/lib/federated";

const timeFormat = new Intl.DateTimeFormat("en", {
  dateStyle: "medium",
  timeStyle: "medium",
  timeZone: "UTC",
});

const ROUND_LABELS: Record<RosterEntry["round"], string> = {
  none: "Nothing yet",
  schema: "Round 1 sent",
  fit: "Answering the fit",
  gradients: "Round 2 sent",
};

/** Who is expected and what each client has sent: shards, rows, when last seen, its last refusal. */
export function RosterTable({ roster, missing }: { roster: RosterEntry[]; missing: string[] }) {
  return (
    <div className="overflow-x-auto rounded-lg border border-ink/10 bg-white">
      <table className="w-full text-sm" aria-label="Roster">
        <thead className="bg-paper-deep text-left text-xs tracking-wide text-ink-soft uppercase">
          <tr>
            {["Client", "Shards", "Rows", "Last seen (UTC)", "Round", "Last refusal"].map(
              (header) => (
                <th key={header} scope="col" className="px-3 py-2 font-medium">
                  {header}
                </th>
              ),
            )}
          </tr>
        </thead>
        <tbody className="divide-y divide-ink/5">
          {roster.map((entry) => (
            <tr key={entry.client} data-client={entry.client}>
              <th scope="row" className="px-3 py-2 text-left font-medium break-words">
                {entry.client}
                {missing.includes(entry.client) ? (
                  <span className="ml-2 rounded-full bg-cadmium-soft px-2 py-0.5 text-xs font-normal">
                    left out
                  </span>
                ) : null}
              </th>
              <td className="px-3 py-2 break-words">
                {entry.shards.length > 0 ? (
                  <>
                    <span className="tabular-nums">{entry.shards.length}</span>
                    <span className="block text-xs text-ink-soft">
                      {entry.shards.slice(0, 6).join(", ")}
                      {entry.shards.length > 6 ? `, … (${entry.shards.length - 6} more)` : ""}
                    </span>
                  </>
                ) : (
                  "—"
                )}
              </td>
              <td className="px-3 py-2 tabular-nums">
                {entry.rows > 0 ? entry.rows.toLocaleString("en") : "—"}
              </td>
              <td className="px-3 py-2 tabular-nums">
                {entry.lastSeenAt ? timeFormat.format(new Date(entry.lastSeenAt)) : "Never"}
              </td>
              <td className="px-3 py-2">{ROUND_LABELS[entry.round]}</td>
              <td className="max-w-sm px-3 py-2 text-xs break-words text-cadmium">
                {entry.lastRefusal ?? ""}
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
