import { formatFigure } from "@/lib/reports/report-view";

/**
 * Regression's label bins (methods.md §4) as a table: each decile bin's smallest and largest label
 * value and its share of all rows, so the chart's legend reads in the label's own units.
 */
export function LabelBinTable({
  categories,
  ranges,
  pooled,
}: {
  categories: string[];
  ranges: [number, number][];
  pooled: number[];
}) {
  return (
    <div className="mt-4 overflow-x-auto rounded-md border border-ink/10 bg-white">
      <table className="w-full text-left text-sm">
        <caption className="sr-only">
          The label bins: label values each holds, share of rows
        </caption>
        <thead className="bg-paper-deep/60 text-xs">
          <tr>
            <th scope="col" className="px-3 py-2">
              Bin
            </th>
            <th scope="col" className="px-3 py-2">
              Smallest label
            </th>
            <th scope="col" className="px-3 py-2">
              Largest label
            </th>
            <th scope="col" className="px-3 py-2">
              Share of all rows
            </th>
          </tr>
        </thead>
        <tbody>
          {categories.map((category, bin) => (
            <tr key={category} className="border-t border-ink/5">
              <th scope="row" className="px-3 py-1.5 font-medium">
                {category}
              </th>
              <td className="px-3 py-1.5 tabular-nums">{formatFigure(ranges[bin]?.[0])}</td>
              <td className="px-3 py-1.5 tabular-nums">{formatFigure(ranges[bin]?.[1])}</td>
              <td className="px-3 py-1.5 tabular-nums">{formatFigure(pooled[bin] * 100)} %</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
