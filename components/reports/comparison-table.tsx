import type { ComparisonRow } from "@/lib/reports/report-comparison";

/** The figures of two reports side by side; rows that differ are marked in words and colour. */
export function ComparisonTable({
  rows,
  headings,
}: {
  rows: ComparisonRow[];
  headings: [string, string];
}) {
  const groups = [...new Set(rows.map((row) => row.group))];
  return (
    <div className="relative overflow-x-auto rounded-lg border border-ink/10 bg-white">
      <table className="w-full text-left text-sm">
        <caption className="sr-only">
          Key figures of the two reports; rows marked “differs” have different values.
        </caption>
        <thead className="bg-paper-deep/60 text-xs text-ink-soft">
          <tr>
            <th scope="col" className="px-3 py-2">
              Figure
            </th>
            <th scope="col" className="px-3 py-2">
              {headings[0]}
            </th>
            <th scope="col" className="px-3 py-2">
              {headings[1]}
            </th>
            <th scope="col" className="px-3 py-2">
              <span className="sr-only">Difference</span>
            </th>
          </tr>
        </thead>
        {groups.map((group) => (
          <tbody key={group}>
            <tr>
              <th
                scope="rowgroup"
                colSpan={4}
                className="bg-paper/60 px-3 pt-3 pb-1 text-xs font-semibold tracking-wide text-ink-soft uppercase"
              >
                {group}
              </th>
            </tr>
            {rows
              .filter((row) => row.group === group)
              .map((row) => (
                <tr
                  key={row.label}
                  className={`border-t border-ink/5 ${row.differs ? "bg-cadmium-soft/60" : ""}`}
                >
                  <th scope="row" className="px-3 py-1.5 font-medium">
                    {row.label}
                  </th>
                  <td className="px-3 py-1.5 tabular-nums break-words">{row.a}</td>
                  <td className="px-3 py-1.5 tabular-nums break-words">{row.b}</td>
                  <td className="px-3 py-1.5 text-xs font-semibold text-cadmium">
                    {row.differs ? "differs" : ""}
                  </td>
                </tr>
              ))}
          </tbody>
        ))}
      </table>
    </div>
  );
}
